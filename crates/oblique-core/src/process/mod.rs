//! Process estimates: how a set-up (capacitor bank and coil, or explosive charge) produces the
//! impact velocity. Filled in by the process-model work (issue 5).

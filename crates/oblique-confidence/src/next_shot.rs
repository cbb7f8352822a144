//! Next shots (to come).

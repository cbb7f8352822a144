//! Fitting (to come).

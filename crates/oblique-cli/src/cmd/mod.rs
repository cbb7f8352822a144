//! One module per subcommand. Each owns its flags; none imports another.

pub mod aim;
pub mod check;
pub mod demo;
pub mod estimate;
pub mod explain;
pub mod map;
pub mod material;
pub mod new;
pub mod pair;
pub mod plot;
pub mod report;
pub mod shell;
pub mod trade;

//! The `foilsweep` command line (being written).
fn main() {}

//! (being written; see DEVELOPERS.md for this crate's contract)
#![warn(missing_docs)]

pub mod state;

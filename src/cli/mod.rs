//! Command-line glue that is more than one call into the library: the study commands' progress
//! bar, Ctrl-C handling and output streams.

pub mod evaluate;
pub mod sweep;

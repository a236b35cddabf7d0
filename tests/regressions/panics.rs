//! (filled by the fix that goes with it)

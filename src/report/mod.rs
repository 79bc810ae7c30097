//! Writing the output workbook from a [`model::Report`].
//!
//! The writer only lays out figures it is given; it computes nothing but
//! formats. It writes to a temporary file beside the target and renames it
//! into place only when complete.

pub mod model;

//! Checks of the local-image counts (crate-private cross-check functions in
//! `selmer::local_count`) against outside sources; unit tests so that the
//! cross-check functions stay out of the public face.

mod local_count_checks;
mod local_count_families;

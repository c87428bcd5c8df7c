//! Checks of the local-image counts (crate-private cross-check functions in
//! `selmer::image_size`) against outside sources; unit tests so that the
//! cross-check functions stay out of the public face.

mod image_size_checks;
mod image_size_families;

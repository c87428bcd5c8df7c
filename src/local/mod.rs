//! Layer: local (in progress).

//! Layer: descent (in progress).

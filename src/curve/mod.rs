//! Layer: curve (in progress).

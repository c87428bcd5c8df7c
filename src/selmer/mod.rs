//! Layer: selmer (in progress).

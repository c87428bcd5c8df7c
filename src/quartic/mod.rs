//! Layer: quartic (in progress).

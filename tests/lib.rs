//! Cross-crate and end-to-end tests live in `tests/`; this library is empty.

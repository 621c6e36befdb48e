//! Placeholder: see README.md.

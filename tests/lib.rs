//! Shared helpers for the validation suite and the end-to-end tests.

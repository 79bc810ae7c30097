//! Growth arithmetic (placeholder, being filled).

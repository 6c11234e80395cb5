//! The ramulus command line (stub).
fn main() {}

//! The `tuft` command.

fn main() {
    println!("tuft {}", env!("CARGO_PKG_VERSION"));
}

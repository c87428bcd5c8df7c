//! Command-line front end for the descent (being built).
fn main() {
    println!("isodescent: descent front end under construction");
}

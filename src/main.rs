fn main() {
    println!("isochore");
}

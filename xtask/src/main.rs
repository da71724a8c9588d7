//! Project chores: `cargo xtask build | serve | dist | test | bench`.

fn main() {
    eprintln!("xtask: not yet");
}

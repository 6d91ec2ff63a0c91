fn main() {
    std::process::exit(chiroptic::cli::run(std::env::args_os()));
}

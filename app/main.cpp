#include "app/cli.hpp"

int main(int argc, char** argv) { return unchain::app::run_cli(argc, argv); }

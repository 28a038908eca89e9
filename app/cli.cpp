#include "app/cli.hpp"

#include <iostream>

namespace unchain::app {

int run_cli(int, char**) {
  std::cout << "unchain\n";
  return 0;
}

}  // namespace unchain::app

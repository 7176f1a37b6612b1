// The strewn program: a thin shell over run_cli().
#include <iostream>

#include "run_cli.hpp"

int main(int argc, char** argv) { return strewn::cli::run_cli(argc, argv, std::cout, std::cerr); }

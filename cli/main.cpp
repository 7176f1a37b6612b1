// The strewn program: a thin shell over run_cli(), on one process or as one rank of an mpirun
// job (cli/distribute/cluster.hpp).
#include <iostream>

#include "distribute/cluster.hpp"
#include "run_cli.hpp"

int main(int argc, char** argv) {
  const strewn::cli::Cluster cluster;
  return strewn::cli::run_cli(argc, argv, std::cout, std::cerr, cluster.distributor());
}

// The Cluster of a build without MPI (STREWN_WITH_MPI off or Open MPI not found): this process
// alone, whatever launched it.
#include "distribute/cluster.hpp"

namespace strewn::cli {

Cluster::Cluster() = default;
Cluster::~Cluster() = default;

}  // namespace strewn::cli

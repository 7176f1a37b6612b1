#ifndef STREWN_CLI_DISTRIBUTE_CLUSTER_HPP
#define STREWN_CLI_DISTRIBUTE_CLUSTER_HPP

// The processes a run of `strewn` shares its work with: under `mpirun -n N` (a build with
// STREWN_WITH_MPI), N processes with ranks 0 .. N-1, rank 0 gathering the results and writing the
// outputs; started any other way, this process alone, with no MPI call at all (so the binary runs
// unchanged without mpirun). The MPI calls live in cluster_mpi.cpp only; no header includes mpi.h.

#include <memory>

#include "strewn/distribute.hpp"

namespace strewn::cli {

class Cluster {
 public:
  // Joins the MPI job when the process was started by mpirun (its environment says so), else
  // stays alone. Ends the job (MPI_Finalize) when destroyed.
  Cluster();
  ~Cluster();
  Cluster(const Cluster&) = delete;
  Cluster& operator=(const Cluster&) = delete;

  int rank() const { return rank_; }
  int size() const { return size_; }
  // Shares items among the ranks (rank 0 hands them out and gathers); nullptr when alone.
  const Distributor* distributor() const { return distributor_.get(); }

 private:
  int rank_ = 0, size_ = 1;
  bool joined_ = false;
  std::unique_ptr<Distributor> distributor_;
};

}  // namespace strewn::cli

#endif

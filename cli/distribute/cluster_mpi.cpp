// The Cluster of a build with MPI (Open MPI): joins the job when started by mpirun and shares
// items by dynamic scheduling. Rank 0 is the manager: it hands out one item at a time to
// whichever worker asks, stores each result as it arrives and stops every worker at the end;
// ranks 1 .. N-1 compute. (Rank 0 does not compute: it answers requests at once, so that no
// worker waits for a tile to be handed out while the manager is busy with one of its own.)
#include "distribute/cluster.hpp"

// The C interface only: Open MPI's (deprecated) C++ bindings would need libmpi_cxx.
#define OMPI_SKIP_MPICXX 1
#define MPICH_SKIP_MPICXX 1
#include <mpi.h>

#include <chrono>
#include <cstdint>
#include <cstdlib>
#include <cstring>
#include <stdexcept>
#include <string>
#include <thread>
#include <vector>

#include "strewn/error.hpp"

namespace strewn::cli {
namespace {

// Messages: a worker sends [int64 item][uint8 outcome][result bytes or message] with item -1 for
// "ready" (its first request); the manager answers [int64 item] to hand out an item, -1 to stop,
// or -2 followed by [uint8 outcome][message] to stop because an item failed.
// Each run has its own pair of tags (the run's number, the same on every rank since every rank
// calls run() in the same order): a worker told to stop goes on to the next run at once, and its
// first request there must wait for the manager's next run, not be taken as part of this one.
constexpr int kRunTags = 16000;  // pairs of tags before they repeat (MPI guarantees tags to 32767)
constexpr std::int64_t kReady = -1, kStop = -1, kAbort = -2;
enum Outcome : std::uint8_t { kDone = 0, kBadInput = 1, kInternal = 2 };

std::string header(std::int64_t item, std::uint8_t outcome) {
  std::string m(sizeof item + 1, '\0');
  std::memcpy(&m[0], &item, sizeof item);
  m[sizeof item] = static_cast<char>(outcome);
  return m;
}

void send(const std::string& bytes, int to, int tag) {
  MPI_Send(bytes.data(), static_cast<int>(bytes.size()), MPI_BYTE, to, tag, MPI_COMM_WORLD);
}

// The next message with `tag` from `from` (MPI_ANY_SOURCE: anyone); `poll`: wait by probing
// every millisecond instead of a blocking receive, whose busy wait would take a core from the
// workers on a machine with fewer cores than ranks (probing every 100 us still took 10% of a
// core here; a tile takes far longer than the added millisecond).
std::string receive(int from, int tag, int* source, bool poll) {
  MPI_Status status;
  if (poll) {
    int ready = 0;
    for (;;) {
      MPI_Iprobe(from, tag, MPI_COMM_WORLD, &ready, &status);
      if (ready) break;
      std::this_thread::sleep_for(std::chrono::milliseconds(1));
    }
  } else {
    MPI_Probe(from, tag, MPI_COMM_WORLD, &status);
  }
  int count = 0;
  MPI_Get_count(&status, MPI_BYTE, &count);
  std::string bytes(static_cast<std::size_t>(count), '\0');
  MPI_Recv(bytes.data(), count, MPI_BYTE, status.MPI_SOURCE, tag, MPI_COMM_WORLD, MPI_STATUS_IGNORE);
  if (source != nullptr) *source = status.MPI_SOURCE;
  return bytes;
}

[[noreturn]] void rethrow(std::uint8_t outcome, const std::string& message) {
  if (outcome == kBadInput) throw input_error(message);
  throw std::runtime_error(message);
}

class MpiDistributor final : public Distributor {
 public:
  MpiDistributor(int rank, int size) : rank_(rank), size_(size) {}
  int processes() const override { return size_; }
  bool gathers() const override { return rank_ == 0; }

  void run(std::size_t count, const ItemFn& compute, const StoreFn& store, const ProgressFn& progress) const override {
    const int to_manager = 2 * (runs_ % kRunTags) + 1, to_worker = to_manager + 1;
    ++runs_;
    if (rank_ == 0) manage(count, store, progress, to_manager, to_worker);
    else work(compute, to_manager, to_worker);
  }

 private:
  void manage(std::size_t count, const StoreFn& store, const ProgressFn& progress, int to_manager,
              int to_worker) const {
    std::size_t next = 0, stored = 0;
    int active = size_ - 1;
    std::uint8_t failure = kDone;
    std::string failure_message;
    while (active > 0) {
      int worker = 0;
      const std::string m = receive(MPI_ANY_SOURCE, to_manager, &worker, true);
      std::int64_t item = kReady;
      std::memcpy(&item, m.data(), sizeof item);
      const auto outcome = static_cast<std::uint8_t>(m[sizeof item]);
      const std::string body = m.substr(sizeof item + 1);
      if (outcome != kDone) {
        if (failure == kDone) failure = outcome, failure_message = body;  // the first failure wins
      } else if (item >= 0 && failure == kDone) {
        try {
          store(static_cast<std::size_t>(item), body);
          ++stored;
          if (progress) progress(static_cast<double>(stored) / static_cast<double>(count));
        } catch (const std::exception& e) {
          failure = kInternal, failure_message = e.what();
        }
      }
      if (failure != kDone) {
        send(header(kAbort, failure) + failure_message, worker, to_worker);
        --active;
      } else if (next < count) {
        send(header(static_cast<std::int64_t>(next++), kDone).substr(0, sizeof(std::int64_t)), worker, to_worker);
      } else {
        send(header(kStop, kDone).substr(0, sizeof(std::int64_t)), worker, to_worker);
        --active;
      }
    }
    if (failure != kDone) rethrow(failure, failure_message);
  }

  void work(const ItemFn& compute, int to_manager, int to_worker) const {
    std::string reply = header(kReady, kDone);
    for (;;) {
      send(reply, 0, to_manager);
      const std::string m = receive(0, to_worker, nullptr, false);
      std::int64_t item = kStop;
      std::memcpy(&item, m.data(), sizeof item);
      if (item == kStop) return;
      if (item == kAbort) rethrow(static_cast<std::uint8_t>(m[sizeof item]), m.substr(sizeof item + 1));
      try {
        reply = header(item, kDone) + compute(static_cast<std::size_t>(item));
      } catch (const input_error& e) {
        reply = header(item, kBadInput) + e.what();
      } catch (const std::exception& e) {
        reply = header(item, kInternal) + e.what();
      }
    }
  }

  int rank_, size_;
  mutable int runs_ = 0;  // runs so far: picks this run's tags
};

// Started by mpirun (Open MPI, or a PMI/PMIx launcher): only then is MPI initialised, so that a
// plain run makes no MPI call (Open MPI's singleton start would spawn a helper daemon).
bool started_by_mpirun() {
  for (const char* v : {"OMPI_COMM_WORLD_SIZE", "PMIX_RANK", "PMI_RANK", "PMI_SIZE"})
    if (std::getenv(v) != nullptr) return true;
  return false;
}

}  // namespace

Cluster::Cluster() {
  if (!started_by_mpirun()) return;
  int already = 0;
  MPI_Initialized(&already);
  if (already) return;
  MPI_Init(nullptr, nullptr);
  joined_ = true;
  MPI_Comm_rank(MPI_COMM_WORLD, &rank_);
  MPI_Comm_size(MPI_COMM_WORLD, &size_);
  if (size_ > 1) distributor_ = std::make_unique<MpiDistributor>(rank_, size_);
}

Cluster::~Cluster() {
  if (!joined_) return;
  // Every rank waits for the others before leaving, so that mpirun, which ends the job when one
  // rank exits with a non-zero status, cannot cut rank 0 short before its message is printed.
  MPI_Barrier(MPI_COMM_WORLD);
  MPI_Finalize();
}

}  // namespace strewn::cli

// The MPI scheduler behind strewn::Distributor (cli/distribute/cluster_mpi.cpp), run by ctest
// under `mpirun -n 3` (tests/CMakeLists.txt): every item computed once and stored once on rank 0
// whatever rank computed it; an item that throws bad input makes every rank throw
// strewn::input_error with that one message (the program then exits 2 on every rank), an item
// that throws anything else makes every rank throw std::runtime_error (exit 1), and a run after
// a failed one still works. Each rank prints nothing but its failures; exit 0 when all hold.
#include <cstdio>
#include <stdexcept>
#include <string>
#include <vector>

#include "distribute/cluster.hpp"
#include "strewn/error.hpp"

namespace {

int failures = 0;

void check(bool ok, const char* what, int rank) {
  if (!ok) {
    std::fprintf(stderr, "rank %d: FAILED: %s\n", rank, what);
    ++failures;
  }
}

}  // namespace

int main() {
  const strewn::cli::Cluster cluster;
  const int rank = cluster.rank();
  const strewn::Distributor* d = cluster.distributor();
  check(d != nullptr && d->processes() == cluster.size() && cluster.size() >= 2, "joined an mpirun job of 2 or more ranks", rank);
  if (d == nullptr) return 1;

  // Every item stored once, with its own result, in any order.
  const std::size_t n = 50;
  std::vector<int> stored(n, 0);
  std::vector<std::string> bytes(n);
  d->run(n, [](std::size_t i) { return std::to_string(i * i); },
         [&](std::size_t i, const std::string& b) { ++stored[i], bytes[i] = b; }, {});
  for (std::size_t i = 0; i < n; ++i)
    check(rank == 0 ? stored[i] == 1 && bytes[i] == std::to_string(i * i) : stored[i] == 0,
          "each item stored once on rank 0 with its result, never on another rank", rank);

  // Bad input in one item: every rank throws input_error with that item's message.
  std::string caught;
  try {
    d->run(n, [](std::size_t i) -> std::string {
             if (i == 17) throw strewn::input_error("item 17 is bad");
             return "ok";
           }, [](std::size_t, const std::string&) {}, {});
  } catch (const strewn::input_error& e) {
    caught = std::string("input_error: ") + e.what();
  } catch (const std::exception& e) {
    caught = std::string("other: ") + e.what();
  }
  check(caught == "input_error: item 17 is bad", "bad input in one item reaches every rank as input_error", rank);

  // An internal failure: every rank throws std::runtime_error (not input_error).
  caught.clear();
  try {
    d->run(n, [](std::size_t i) -> std::string {
             if (i == 3) throw std::logic_error("internal trouble");
             return "ok";
           }, [](std::size_t, const std::string&) {}, {});
  } catch (const strewn::input_error& e) {
    caught = std::string("input_error: ") + e.what();
  } catch (const std::runtime_error& e) {
    caught = std::string("runtime_error: ") + e.what();
  }
  check(caught == "runtime_error: internal trouble", "an internal failure reaches every rank as runtime_error", rank);

  // A later run works again; no items at all is a run too.
  std::size_t total = 0;
  d->run(7, [](std::size_t i) { return std::string(i, 'x'); },
         [&](std::size_t, const std::string& b) { total += b.size(); }, {});
  check(rank != 0 || total == 21, "a run after failed runs gathers every item", rank);
  d->run(0, [](std::size_t) { return std::string(); }, [&](std::size_t, const std::string&) { ++total; }, {});
  check(rank != 0 || total == 21, "an empty run stores nothing", rank);
  if (rank == 0 && failures == 0) std::printf("scheduler checks passed on %d ranks\n", cluster.size());
  return failures == 0 ? 0 : 1;
}

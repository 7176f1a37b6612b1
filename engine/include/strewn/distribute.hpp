#ifndef STREWN_DISTRIBUTE_HPP
#define STREWN_DISTRIBUTE_HPP

/// \file
/// Sharing the items of a long computation (the row tiles of a risk map, the combinations of a
/// sweep) among processes, without the engine knowing how the processes talk. A program that
/// runs on several processes (the command line under `mpirun`, cli/distribute/) implements
/// Distributor; the engine cuts its work into numbered items, says how to compute one item as
/// bytes and how to store an item's bytes, and calls run_items(). Every process calls it with the
/// same count; compute() may run on any process, store() runs only on the gathering process
/// (Distributor::gathers()), once per item. Results do not depend on which process computed
/// which item, so the output is the same whatever the number of processes.
///
/// Without a distributor (nullptr) the items run on this process's threads (parallel_for).
///
/// Example (every item's result gathered in order):
/// \code
///   std::vector<std::string> out(n);
///   strewn::run_items(distributor, n, threads,
///                     [&](std::size_t i) { return compute_item(i); },
///                     [&](std::size_t i, const std::string& bytes) { out[i] = bytes; });
/// \endcode
///
/// Failures: the first item whose compute() throws stops the run on every process; every
/// process then throws the same error (strewn::input_error for bad input, std::runtime_error
/// otherwise, with the first failure's message), so that each process takes the same exit path.

#include <cstddef>
#include <functional>
#include <string>

#include "strewn/export.hpp"
#include "strewn/work.hpp"

namespace strewn {

class STREWN_API Distributor {
 public:
  using ItemFn = std::function<std::string(std::size_t)>;
  using StoreFn = std::function<void(std::size_t, const std::string&)>;
  virtual ~Distributor() = default;
  /// How many processes share the work (1: this one alone).
  virtual int processes() const = 0;
  /// True on the one process where store() is called and results are written.
  virtual bool gathers() const = 0;
  /// compute(i) for every i < count on some process, store(i, bytes) on the gathering process;
  /// `progress` (gathering process only) hears the share of items stored.
  virtual void run(std::size_t count, const ItemFn& compute, const StoreFn& store,
                   const ProgressFn& progress) const = 0;
};

/// run() on `distributor` when it shares work among more than one process, else every item on
/// this process's `threads` threads (0: all cores), stored in order of the items.
STREWN_API void run_items(const Distributor* distributor, std::size_t count, int threads,
                          const Distributor::ItemFn& compute, const Distributor::StoreFn& store,
                          const ProgressFn& progress = {});

/// True when there is no distributor or this process is the gathering one.
inline bool gathers_results(const Distributor* distributor) {
  return distributor == nullptr || distributor->gathers();
}

}  // namespace strewn

#endif

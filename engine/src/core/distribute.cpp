#include "strewn/distribute.hpp"

#include <vector>

namespace strewn {

void run_items(const Distributor* distributor, std::size_t count, int threads, const Distributor::ItemFn& compute,
               const Distributor::StoreFn& store, const ProgressFn& progress) {
  if (distributor != nullptr && distributor->processes() > 1) {
    distributor->run(count, compute, store, progress);
    return;
  }
  // One process: items on its threads, each result kept and stored in the items' order, so that
  // store() sees the same sequence as the gathering process of a distributed run would allow.
  std::vector<std::string> results(count);
  parallel_for(count, threads, [&](std::size_t i) { results[i] = compute(i); }, progress);
  for (std::size_t i = 0; i < count; ++i) store(i, results[i]);
}

}  // namespace strewn

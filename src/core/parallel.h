// Work shared out to threads: the one way alphatrail runs pure computation in parallel
// (series file parsing, decoding stored observations, evaluating many strategies).
#pragma once

#include <algorithm>
#include <cstddef>
#include <exception>
#include <system_error>
#include <thread>
#include <vector>

namespace alphatrail::core {

// Returns how many workers suit `items` pieces of work of which each worker should get at
// least `min_per_worker`: between 1 and the number of cores (or `requested` when > 0).
// Example: worker_count(10, 16) == 1; worker_count(1000, 16) == the number of cores.
inline unsigned worker_count(std::size_t items, std::size_t min_per_worker, int requested = 0) {
  const unsigned cores = requested > 0 ? static_cast<unsigned>(requested)
                                       : std::max(1u, std::thread::hardware_concurrency());
  const std::size_t useful =
      std::max<std::size_t>(1, items / std::max<std::size_t>(1, min_per_worker));
  return static_cast<unsigned>(std::min<std::size_t>(cores, useful));
}

// Runs task(0..tasks-1) on up to `tasks` threads (task 0 on the caller's) and rethrows the
// error of the lowest-numbered failing task, so the outcome does not depend on timing. A task
// whose thread cannot start runs on the caller after task 0, so task 0 may feed the others.
template <typename Task>
void run_parallel(std::size_t tasks, const Task& task) {
  std::vector<std::exception_ptr> errors(tasks);
  auto guarded = [&](std::size_t k) {
    try {
      task(k);
    } catch (...) {
      errors[k] = std::current_exception();
    }
  };
  std::vector<std::thread> threads;
  std::vector<std::size_t> here;  // no thread to spare: these run on the caller, after task 0
  for (std::size_t k = 1; k < tasks; ++k) {
    try {
      threads.emplace_back(guarded, k);
    } catch (const std::system_error&) {
      here.push_back(k);
    }
  }
  if (tasks > 0) guarded(0);
  for (const std::size_t k : here) guarded(k);
  for (auto& t : threads) t.join();
  for (const auto& e : errors)
    if (e) std::rethrow_exception(e);
}

// Splits [0, n) into `workers` contiguous ranges and runs body(begin, end) on each in
// parallel; errors as run_parallel.
template <typename Body>
void parallel_ranges(std::size_t n, unsigned workers, const Body& body) {
  workers = std::max(1u, workers);
  const std::size_t chunk = (n + workers - 1) / workers;
  run_parallel(workers, [&](std::size_t w) {
    const std::size_t begin = std::min(n, w * chunk);
    const std::size_t end = std::min(n, begin + chunk);
    if (begin < end) body(begin, end);
  });
}

}  // namespace alphatrail::core

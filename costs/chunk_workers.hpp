#pragma once
// Threads that evaluate the items of one chunk after another: the calling
// thread and `threads - 1` workers that live as long as this object, so
// that each thread keeps its allocator arena, its caches and (in a case
// study) its pooled document copy from one chunk to the next. Used by the
// Monte Carlo engine (monte_carlo.cpp), which reduces each chunk in item
// order between two runs.

#include <atomic>
#include <barrier>
#include <cstddef>
#include <exception>
#include <functional>
#include <mutex>
#include <thread>
#include <vector>

namespace unchain::costs {

class ChunkWorkers {
 public:
  // `evaluate_item(i)` is called once for each i of a chunk, on any of the
  // threads; calls for different i may run at the same time.
  ChunkWorkers(unsigned threads, std::function<void(std::size_t)> evaluate_item);
  ChunkWorkers(const ChunkWorkers&) = delete;
  ChunkWorkers& operator=(const ChunkWorkers&) = delete;
  // Stops the workers (they wait between chunks) and joins them.
  ~ChunkWorkers();

  // Evaluates items [start, end) on every thread and returns once all are
  // done; what they wrote is then visible to the caller. The first
  // exception an item threw is rethrown here, after every thread stopped.
  void run(std::size_t start, std::size_t end);

 private:
  void drain() noexcept;

  std::function<void(std::size_t)> evaluate_item_;
  std::atomic<std::size_t> next_{0};
  std::size_t end_ = 0;     // written before `ready_`, read after it
  bool stopping_ = false;   // likewise
  std::mutex error_mutex_;
  std::exception_ptr error_;
  std::barrier<> ready_;    // a chunk is set up (or the workers are to stop)
  std::barrier<> done_;     // every item of the chunk is done
  std::vector<std::jthread> workers_;  // last: joined before the barriers go
};

}  // namespace unchain::costs

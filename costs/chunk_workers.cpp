#include "costs/chunk_workers.hpp"

#include <utility>

namespace unchain::costs {

ChunkWorkers::ChunkWorkers(unsigned threads, std::function<void(std::size_t)> evaluate_item)
    : evaluate_item_(std::move(evaluate_item)),
      ready_(static_cast<std::ptrdiff_t>(threads == 0 ? 1 : threads)),
      done_(static_cast<std::ptrdiff_t>(threads == 0 ? 1 : threads)) {
  for (unsigned t = 1; t < threads; ++t)
    workers_.emplace_back([this] {
      for (;;) {
        ready_.arrive_and_wait();  // the barrier orders the set-up before the reads below
        if (stopping_) return;
        drain();
        done_.arrive_and_wait();
      }
    });
}

ChunkWorkers::~ChunkWorkers() {
  stopping_ = true;
  ready_.arrive_and_wait();  // the workers wait here between chunks; they see stopping_ and return
}

void ChunkWorkers::run(std::size_t start, std::size_t end) {
  end_ = end;
  next_.store(start);
  ready_.arrive_and_wait();
  drain();
  done_.arrive_and_wait();
  if (error_) std::rethrow_exception(std::exchange(error_, nullptr));
}

void ChunkWorkers::drain() noexcept {
  for (;;) {
    const std::size_t i = next_.fetch_add(1);
    if (i >= end_) return;
    try {
      evaluate_item_(i);
    } catch (...) {
      std::lock_guard<std::mutex> lock(error_mutex_);
      if (!error_) error_ = std::current_exception();
    }
  }
}

}  // namespace unchain::costs

// ChunkWorkers: the persistent threads of the Monte Carlo engine.

#include <doctest/doctest.h>

#include <atomic>
#include <mutex>
#include <set>
#include <stdexcept>
#include <thread>
#include <utility>
#include <vector>

#include "costs/chunk_workers.hpp"

using unchain::costs::ChunkWorkers;

TEST_CASE("chunk workers: every item of every chunk is evaluated once, by the same threads throughout") {
  for (const unsigned threads : {1u, 2u, 3u}) {
    std::vector<std::atomic<int>> calls(1000);
    std::mutex ids_mutex;
    std::set<std::thread::id> ids;
    {
      ChunkWorkers workers(threads, [&](std::size_t i) {
        calls[i].fetch_add(1);
        std::lock_guard<std::mutex> lock(ids_mutex);
        ids.insert(std::this_thread::get_id());
      });
      // Uneven chunks, one of them empty, and the last one short.
      for (const auto& [start, end] : std::vector<std::pair<std::size_t, std::size_t>>{
               {0, 300}, {300, 300}, {300, 301}, {301, 999}, {999, 1000}})
        workers.run(start, end);
    }
    for (std::size_t i = 0; i < calls.size(); ++i) CHECK(calls[i].load() == 1);
    // No more threads than asked for took part, however many chunks ran.
    CHECK(ids.size() <= threads);
    CHECK(ids.count(std::this_thread::get_id()) <= 1);
  }
}

TEST_CASE("chunk workers: an item's exception reaches the caller after the chunk, and the workers stay usable") {
  std::atomic<int> done{0};
  ChunkWorkers workers(2, [&](std::size_t i) {
    if (i == 17) throw std::runtime_error("item 17 failed");
    done.fetch_add(1);
  });
  CHECK_THROWS_WITH_AS(workers.run(0, 100), "item 17 failed", std::runtime_error);
  CHECK(done.load() == 99);  // the other items of the chunk still ran
  workers.run(100, 150);
  CHECK(done.load() == 149);
}  // the destructor stops and joins the worker: the test ends rather than hangs

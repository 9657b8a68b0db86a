// Group commit for readings: one writer thread gathers the batches of
// concurrent requests and stores them together in one transaction
// (Store::append_reading_batches), then acknowledges each after COMMIT.
//
// With synchronous=FULL every commit costs an fsync; sharing it among the
// requests that arrived meanwhile keeps single-reading POSTs fast without
// weakening durability: no request is answered before its COMMIT returns.
//
// Acknowledging (rendering each answer) runs on a second thread, so the
// writer starts the next transaction while the last one's answers are
// written: the writer thread does nothing but store.
//
// Requests prepare their readings (parse, derive, hash) on the server's
// worker threads, but at most `preparers` at once (PrepareSlot; not held
// while a request waits on the database):
// the writer is the one step that cannot run in parallel, so it should not
// queue for a core behind a crowd of preparing workers. With 8 workers
// preparing 500-reading bodies on 2 cores, the writer was runnable but not
// running for about a fifth of its time (figures in DEVELOPERS.md).
#pragma once

#include <condition_variable>
#include <cstddef>
#include <deque>
#include <functional>
#include <mutex>
#include <semaphore>
#include <thread>
#include <vector>

#include "server/api/clock.hpp"
#include "server/storage/store.hpp"

namespace pbfleet::api {

// The most requests that may prepare at once, whatever is configured.
inline constexpr std::size_t kMaxPreparers = 1024;

struct WriterOptions {
  // Batches stored in one transaction at most; bounds one commit's latency.
  std::size_t max_batches_per_commit = 1024;
  // Batches waiting at most; beyond it submit() refuses (the caller answers 503).
  std::size_t max_pending = 16 * 1024;
  // Requests preparing readings at once; 0 = one fewer than the cores
  // (at least 1), leaving a core to the writer.
  std::size_t preparers = 0;
};

// The number of preparers `options` asks for on a machine with `cores`.
std::size_t preparers_for(const WriterOptions& options, unsigned cores);

class ReadingWriter {
 public:
  // Prepared on the submitting thread (storage::prepare_reading): the
  // hashing and deriving happen there, in parallel, not on the writer.
  using Batch = std::vector<storage::PreparedReading>;
  // Called once, on the acknowledging thread, after the transaction ended;
  // callbacks run one at a time, in commit order.
  using Done = std::function<void(storage::StoreResult<storage::AppendOutcome>)>;

  ReadingWriter(storage::Store& store, const Clock& clock, WriterOptions options = {});
  // Stores what is pending, acknowledges it, then stops both threads.
  ~ReadingWriter();
  ReadingWriter(const ReadingWriter&) = delete;
  ReadingWriter& operator=(const ReadingWriter&) = delete;

  // Held while a request prepares readings for submit(); waits while
  // `preparers` others hold one.
  class PrepareSlot {
   public:
    explicit PrepareSlot(ReadingWriter& writer) : writer_(writer) { writer_.preparing_.acquire(); }
    ~PrepareSlot() { writer_.preparing_.release(); }
    PrepareSlot(const PrepareSlot&) = delete;
    PrepareSlot& operator=(const PrepareSlot&) = delete;

   private:
    ReadingWriter& writer_;
  };

  // Queues a batch. False (and `done` not called) when the queue is full
  // or the writer stopped. REQUIRES: each reading passed validate_reading.
  bool submit(Batch batch, Done done);
  // Commits done so far (for benchmarks and metrics).
  [[nodiscard]] std::size_t commits() const;

 private:
  struct Pending {
    Batch batch;
    Done done;
  };
  struct Acknowledgement {
    Done done;
    storage::StoreResult<storage::AppendOutcome> result;
  };
  void run();
  void commit(std::vector<Pending>& group);
  void acknowledge();

  storage::Store& store_;
  const Clock& clock_;
  WriterOptions options_;
  mutable std::mutex mutex_;
  std::condition_variable wake_;
  std::deque<Pending> pending_;
  bool stopping_ = false;
  std::size_t commits_ = 0;

  std::mutex ack_mutex_;
  std::condition_variable ack_wake_;
  std::deque<Acknowledgement> acks_;
  bool writer_done_ = false;  // the writer has handed over its last group

  std::counting_semaphore<kMaxPreparers> preparing_;

  // Last: they start after the members above exist. The acknowledger is
  // declared first so that it is still running while the writer drains.
  std::thread acknowledger_;
  std::thread thread_;
};

}  // namespace pbfleet::api

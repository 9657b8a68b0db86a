#include "server/api/services/reading_writer.hpp"

#include <algorithm>
#include <exception>
#include <utility>

#include "server/http/thread_name.hpp"

namespace pbfleet::api {

std::size_t preparers_for(const WriterOptions& options, unsigned cores) {
  const std::size_t wanted = options.preparers != 0 ? options.preparers : (cores > 1 ? cores - 1 : 1);
  return std::min(wanted, kMaxPreparers);
}

ReadingWriter::ReadingWriter(storage::Store& store, const Clock& clock, WriterOptions options)
    : store_(store),
      clock_(clock),
      options_(options),
      preparing_(static_cast<std::ptrdiff_t>(preparers_for(options, std::thread::hardware_concurrency()))),
      acknowledger_([this] {
        http::name_this_thread("reading-acks");
        acknowledge();
      }),
      thread_([this] {
        http::name_this_thread("reading-writer");
        run();
      }) {}

ReadingWriter::~ReadingWriter() {
  {
    std::lock_guard lock(mutex_);
    stopping_ = true;
  }
  wake_.notify_one();
  thread_.join();  // drained: every group is committed and handed over
  {
    std::lock_guard lock(ack_mutex_);
    writer_done_ = true;
  }
  ack_wake_.notify_one();
  acknowledger_.join();
}

bool ReadingWriter::submit(Batch batch, Done done) {
  {
    std::lock_guard lock(mutex_);
    if (stopping_ || pending_.size() >= options_.max_pending) return false;
    pending_.push_back(Pending{std::move(batch), std::move(done)});
  }
  wake_.notify_one();
  return true;
}

std::size_t ReadingWriter::commits() const {
  std::lock_guard lock(mutex_);
  return commits_;
}

void ReadingWriter::run() {
  std::vector<Pending> group;
  for (;;) {
    {
      std::unique_lock lock(mutex_);
      wake_.wait(lock, [this] { return stopping_ || !pending_.empty(); });
      if (pending_.empty()) return;  // stopping and drained
      while (!pending_.empty() && group.size() < options_.max_batches_per_commit) {
        group.push_back(std::move(pending_.front()));
        pending_.pop_front();
      }
    }
    commit(group);
    group.clear();
  }
}

void ReadingWriter::commit(std::vector<Pending>& group) {
  std::vector<Batch> batches;
  batches.reserve(group.size());
  for (auto& p : group) batches.push_back(std::move(p.batch));
  storage::StoreResult<std::vector<storage::AppendOutcome>> result =
      storage::StoreError{storage::StoreErrc::internal, "reading writer failed", ""};
  try {
    result = store_.append_reading_batches(std::move(batches), clock_.now());
  } catch (const std::exception& e) {
    result = storage::StoreError{storage::StoreErrc::internal, e.what(), ""};
  }
  {
    std::lock_guard lock(mutex_);
    ++commits_;
  }
  {
    std::lock_guard lock(ack_mutex_);
    for (std::size_t i = 0; i < group.size(); ++i) {
      if (!result) {
        acks_.push_back({std::move(group[i].done), result.error()});
      } else {
        acks_.push_back({std::move(group[i].done), std::move(result.value()[i])});
      }
    }
  }
  ack_wake_.notify_one();
}

void ReadingWriter::acknowledge() {
  std::deque<Acknowledgement> ready;
  for (;;) {
    {
      std::unique_lock lock(ack_mutex_);
      ack_wake_.wait(lock, [this] { return writer_done_ || !acks_.empty(); });
      if (acks_.empty()) return;  // the writer stopped and everything is answered
      ready.swap(acks_);
    }
    for (auto& a : ready) a.done(std::move(a.result));
    ready.clear();
  }
}

}  // namespace pbfleet::api

// Names the calling thread (at most 15 characters), so `top -H`, perf and
// gdb show what each of pbfleetd's threads does.
#pragma once

#include <pthread.h>

namespace pbfleet::http {

inline void name_this_thread(const char* name) { pthread_setname_np(pthread_self(), name); }

}  // namespace pbfleet::http

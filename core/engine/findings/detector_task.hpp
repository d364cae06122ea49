// Detectors are C++20 coroutines, so that the finding scanner can spread a
// scan over many short slices without threads (the browser has none): a
// detector suspends where it waits for whole-table work, which the scanner
// then runs in row batches (a fix preview, the steps a view applies), and at
// pause points between pieces of its own work once the slice's budget is
// spent.
//
// Task<T> is a lazy task: it starts when awaited. A task that ends before
// its first suspension lets the awaiting coroutine go on without suspending;
// one that suspended resumes the awaiting coroutine when it ends. (The
// usual symmetric transfer, await_suspend returning the next handle, needs
// WebAssembly tail calls, which older browsers lack.) The stack never holds
// more than the chain of awaiting tasks. After Lewis Baker's cppcoro task
// before symmetric transfer, from memory.
#pragma once

#include <exception>
#include <optional>
#include <utility>

// Debian's Emscripten (3.1.6) ships a libc++ with the coroutine library only
// as <experimental/coroutine>; its clang compiles C++20 coroutines against it
// (CMakeLists.txt turns the deprecation warning off there).
#if __has_include(<coroutine>)
#include <coroutine>
namespace tamis::coro {
using std::coroutine_handle;
using std::suspend_always;
}  // namespace tamis::coro
#else
#include <experimental/coroutine>
namespace tamis::coro {
using std::experimental::coroutine_handle;
using std::experimental::suspend_always;
}  // namespace tamis::coro
#endif

namespace tamis {

template <class T>
class Task;

namespace detail {

struct TaskPromiseBase {
  coro::coroutine_handle<> continuation;
  std::exception_ptr failure;
  bool ended = false;
  bool awaiting_suspended = false;  // the awaiting coroutine waits to be resumed at the end

  coro::suspend_always initial_suspend() noexcept { return {}; }
  struct Resumer {
    bool await_ready() noexcept { return false; }
    template <class Promise>
    void await_suspend(coro::coroutine_handle<Promise> ending) noexcept {
      TaskPromiseBase& promise = ending.promise();
      promise.ended = true;
      // Last: the awaiting coroutine destroys this frame when it goes on.
      if (promise.awaiting_suspended) promise.continuation.resume();
    }
    void await_resume() noexcept {}
  };
  Resumer final_suspend() noexcept { return {}; }
  void unhandled_exception() { failure = std::current_exception(); }
};

template <class T>
struct TaskPromise : TaskPromiseBase {
  std::optional<T> value;
  Task<T> get_return_object();
  template <class U>
  void return_value(U&& v) {
    value.emplace(std::forward<U>(v));
  }
  T take() {
    if (failure) std::rethrow_exception(failure);
    return std::move(*value);
  }
};

template <>
struct TaskPromise<void> : TaskPromiseBase {
  Task<void> get_return_object();
  void return_void() {}
  void take() {
    if (failure) std::rethrow_exception(failure);
  }
};

}  // namespace detail

template <class T = void>
class [[nodiscard]] Task {
 public:
  using promise_type = detail::TaskPromise<T>;
  using Handle = coro::coroutine_handle<promise_type>;

  explicit Task(Handle handle) : handle_(handle) {}
  Task(Task&& other) noexcept : handle_(std::exchange(other.handle_, {})) {}
  Task& operator=(Task&& other) noexcept {
    if (this != &other) {
      if (handle_) handle_.destroy();
      handle_ = std::exchange(other.handle_, {});
    }
    return *this;
  }
  ~Task() {
    if (handle_) handle_.destroy();
  }

  // Awaiting a task starts it; the awaiting coroutine continues when it ends.
  bool await_ready() const noexcept { return false; }
  bool await_suspend(coro::coroutine_handle<> awaiting) {
    promise_type& promise = handle_.promise();
    promise.continuation = awaiting;
    handle_.resume();
    if (promise.ended) return false;
    promise.awaiting_suspended = true;
    return true;
  }
  T await_resume() { return handle_.promise().take(); }

  // For the outermost task, which nothing awaits.
  bool done() const { return handle_.done(); }
  coro::coroutine_handle<> handle() const { return handle_; }
  T result() { return handle_.promise().take(); }

 private:
  Handle handle_;
};

namespace detail {

template <class T>
Task<T> TaskPromise<T>::get_return_object() {
  return Task<T>(coro::coroutine_handle<TaskPromise<T>>::from_promise(*this));
}

inline Task<void> TaskPromise<void>::get_return_object() {
  return Task<void>(coro::coroutine_handle<TaskPromise<void>>::from_promise(*this));
}

}  // namespace detail

}  // namespace tamis

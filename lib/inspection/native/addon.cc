// Node binding of the native inspection engine (node-addon-api). JavaScript keeps the reader
// (files, gzip, the text checks) and the declared-settings reader; this object is the LineSink the
// reader feeds, and runs the parser, measurements, time planner and toolpath settings analysis in
// C++. lib/inspection/nativeEngine.ts is its only caller.
//
//   const e = new Engine({ filamentDiameterMm, limits, parser, toolpath, commentFirstBytes })
//   e.lines(buf, start, end) → lines · e.line(buf, start, end) · e.longLine(bytes)
//   e.takeComments() → null | { bytes: Buffer, ends: Uint32Array, lineNos: Float64Array }
//   e.end() · e.result() → JSON text { parser, measure, toolpath } · e.close() (frees it all)
#include <napi.h>

#include <algorithm>
#include <atomic>
#include <condition_variable>
#include <cstring>
#include <memory>
#include <mutex>
#include <thread>
#include <type_traits>

#include "common.h"
#include "measure.h"
#include "parser.h"
#include "planner.h"
#include "toolpath.h"

namespace {

using namespace hotlap;

struct Event {
  // kLimits is followed by kLimitSlots slots that hold the MotionLimits as bytes (limits change
  // rarely: a ring of limits beside the events would hold 2.7 MB for them).
  enum Type : uint8_t { kSegment, kDwell, kLimits, kEnd } type;
  Segment s;
  double timeS, lineNo;
};
static_assert(std::is_trivially_copyable_v<MotionLimits>, "limits travel as bytes");
constexpr size_t kLimitSlots = (sizeof(MotionLimits) + sizeof(Event) - 1) / sizeof(Event);
// Bytes of the MotionLimits carried by limits slot k (0 … kLimitSlots − 1), from byte k · sizeof(Event).
constexpr size_t limitBytesInSlot(size_t k) { return std::min(sizeof(Event), sizeof(MotionLimits) - k * sizeof(Event)); }

// Two threads, one pipeline: the parser runs on the JavaScript thread inside lines(), and hands
// every event (move, dwell, limits change, end) through this single-producer single-consumer ring
// to a worker thread that runs the measurements, the time planner and the toolpath analysis. The
// worker sees the same events in the same order, and the limits as they were at each event, so the
// report is the one a single thread gives (tests/unit/inspection/native.test.ts). Indices are
// published in batches to keep the two cores from trading the cache line on every move.
//
// A side with nothing to do yields a few times, then sleeps on a condition variable until the
// other side publishes, so it wakes as soon as there is work and burns no CPU while it waits (a
// fixed 50 µs sleep-and-poll before it: same bench time, small files 5–6 ms instead of 3 ms).
class Pipe {
 public:
  static constexpr size_t kSize = 8192;  // a power of two
  static constexpr size_t kBatch = 64;

  // Producer side.
  Event& slot() {
    if (head_ - cachedTail_ == kSize) {
      publish();
      waitUntil(producerWaiting_, [&] { return head_ - (cachedTail_ = tail_.load(std::memory_order_seq_cst)) != kSize; });
    }
    return ring_[head_ & (kSize - 1)];
  }
  void commit() {
    if ((++head_ & (kBatch - 1)) == 0) publish();
  }
  void publish() {
    published_.store(head_, std::memory_order_seq_cst);
    wake(consumerWaiting_);
  }

  // Consumer side: runs until the end event (or stop()).
  template <class F>
  void consume(F&& handle) {
    size_t tail = 0;
    for (;;) {
      size_t head = published_.load(std::memory_order_acquire);
      if (head == tail) {
        waitUntil(consumerWaiting_, [&] { return (head = published_.load(std::memory_order_seq_cst)) != tail || stop_.load(); });
        if (head == tail) return;  // stopped
      }
      for (; tail != head; tail++) {
        const size_t i = tail & (kSize - 1);
        if (!handle(ring_[i])) {
          release(tail + 1);
          return;
        }
        if ((tail & (kBatch - 1)) == 0) release(tail);
      }
      release(tail);
    }
  }
  void stop() {
    stop_.store(true);
    std::lock_guard<std::mutex> lock(mutex_);
    wakeup_.notify_all();
  }

 private:
  void release(size_t tail) {
    tail_.store(tail, std::memory_order_seq_cst);
    wake(producerWaiting_);
  }
  // The waiter raises its flag, then checks again under the lock; the other side publishes, then
  // reads the flag. With both in sequentially consistent order one of them sees the other's write,
  // so no wake-up is lost.
  template <class Ready>
  void waitUntil(std::atomic<bool>& waiting, Ready ready) {
    for (int i = 0; i < 32; i++) {
      if (ready()) return;
      std::this_thread::yield();
    }
    std::unique_lock<std::mutex> lock(mutex_);
    waiting.store(true);
    while (!ready()) wakeup_.wait(lock);
    waiting.store(false);
  }
  void wake(std::atomic<bool>& waiting) {
    if (!waiting.load()) return;
    std::lock_guard<std::mutex> lock(mutex_);
    wakeup_.notify_all();
  }
  Event ring_[kSize];
  size_t head_ = 0;
  size_t cachedTail_ = 0;
  alignas(64) std::atomic<size_t> published_{0};
  alignas(64) std::atomic<size_t> tail_{0};
  alignas(64) std::atomic<bool> stop_{false};
  alignas(64) std::atomic<bool> consumerWaiting_{false};
  std::atomic<bool> producerWaiting_{false};
  std::mutex mutex_;
  std::condition_variable wakeup_;
};

// The parser's one sink: moves, dwells and limits changes go to the worker; comments are kept for
// JavaScript (the declared-settings reader), in order, as bytes.
class Fanout final : public MotionSink {
 public:
  Fanout(const MachineState& machine, Pipe& pipe) : machine_(machine), pipe_(pipe) {
    for (bool& k : keepComment) k = true;
  }
  void segment(const Segment& s) override {
    sendLimits();
    Event& e = pipe_.slot();
    e.type = Event::kSegment;
    e.s = s;
    pipe_.commit();
  }
  void comment(const char* text, size_t len, double lineNo) override {
    if (len == 0 || !keepComment[static_cast<uint8_t>(text[0])]) return;
    commentBytes.append(text, len);
    commentEnds.push_back(static_cast<uint32_t>(commentBytes.size()));
    commentLines.push_back(lineNo);
  }
  void dwell(double timeS, double lineNo) override {
    sendLimits();
    Event& e = pipe_.slot();
    e.type = Event::kDwell;
    e.timeS = timeS;
    e.lineNo = lineNo;
    pipe_.commit();
  }
  void end() override {
    sendLimits();
    pipe_.slot().type = Event::kEnd;
    pipe_.commit();
    pipe_.publish();
  }
  std::string commentBytes;
  std::vector<uint32_t> commentEnds;
  std::vector<double> commentLines;
  // By first byte: whether JavaScript wants the comment (options.commentFirstBytes; default all).
  bool keepComment[256];

 private:
  const MachineState& machine_;
  Pipe& pipe_;
  MotionLimits sent_;
  int sentAccelWrites_ = 0;
  // The worker needs a copy when the limits changed: every change bumps the version except M204's
  // accelerations, which bump accelWrites (slicers repeat M204 per feature, mostly unchanged).
  void sendLimits() {
    const MachineState& m = machine_;
    if (m.version == sent_.version && m.accelWrites == sentAccelWrites_) return;
    sentAccelWrites_ = m.accelWrites;
    if (m.version == sent_.version && m.accelPrintMms2 == sent_.accelPrintMms2 && m.accelTravelMms2 == sent_.accelTravelMms2 &&
        m.accelRetractMms2 == sent_.accelRetractMms2)
      return;
    sent_ = m;
    pipe_.slot().type = Event::kLimits;
    pipe_.commit();
    const auto* bytes = reinterpret_cast<const unsigned char*>(static_cast<const MotionLimits*>(&m));
    for (size_t k = 0; k < kLimitSlots; k++) {
      std::memcpy(static_cast<void*>(&pipe_.slot()), bytes + k * sizeof(Event), limitBytesInSlot(k));
      pipe_.commit();
    }
  }
};

double numberOr(const Napi::Object& o, const char* key, double fallback) {
  Napi::Value v = o.Get(key);
  return v.IsNumber() ? v.As<Napi::Number>().DoubleValue() : fallback;
}

std::optional<double> optionalNumber(const Napi::Object& o, const char* key) {
  Napi::Value v = o.Get(key);
  if (v.IsNumber()) return v.As<Napi::Number>().DoubleValue();
  return std::nullopt;
}

class Engine : public Napi::ObjectWrap<Engine> {
 public:
  static Napi::Function Define(Napi::Env env) {
    return DefineClass(env, "Engine",
                       {InstanceMethod("lines", &Engine::Lines), InstanceMethod("line", &Engine::Line),
                        InstanceMethod("longLine", &Engine::LongLine),
                        InstanceMethod("takeComments", &Engine::TakeComments),
                        InstanceMethod("end", &Engine::End), InstanceMethod("close", &Engine::Close),
                        InstanceMethod("result", &Engine::Result)});
  }

  explicit Engine(const Napi::CallbackInfo& info) : Napi::ObjectWrap<Engine>(info) {
    Napi::Env env = info.Env();
    if (info.Length() < 1 || !info[0].IsObject()) {
      Napi::TypeError::New(env, "Engine(options): options object expected").ThrowAsJavaScriptException();
      return;
    }
    Napi::Object o = info[0].As<Napi::Object>();
    double diameter = numberOr(o, "filamentDiameterMm", 1.75);
    MachineLimits limits = kDefaultLimits;
    if (o.Get("limits").IsObject()) {
      Napi::Object l = o.Get("limits").As<Napi::Object>();
      limits.accelPrintMms2 = numberOr(l, "accelPrintMms2", limits.accelPrintMms2);
      limits.accelTravelMms2 = numberOr(l, "accelTravelMms2", limits.accelTravelMms2);
      limits.accelRetractMms2 = numberOr(l, "accelRetractMms2", limits.accelRetractMms2);
      limits.junctionDeviationMm = numberOr(l, "junctionDeviationMm", limits.junctionDeviationMm);
      limits.jerkXMms = optionalNumber(l, "jerkXMms");
      limits.jerkYMms = optionalNumber(l, "jerkYMms");
      limits.jerkZMms = numberOr(l, "jerkZMms", limits.jerkZMms);
      limits.jerkEMms = numberOr(l, "jerkEMms", limits.jerkEMms);
      limits.maxFeedXMms = numberOr(l, "maxFeedXMms", limits.maxFeedXMms);
      limits.maxFeedYMms = numberOr(l, "maxFeedYMms", limits.maxFeedYMms);
      limits.maxFeedZMms = numberOr(l, "maxFeedZMms", limits.maxFeedZMms);
      limits.maxFeedEMms = numberOr(l, "maxFeedEMms", limits.maxFeedEMms);
      limits.maxAccelXMms2 = numberOr(l, "maxAccelXMms2", limits.maxAccelXMms2);
      limits.maxAccelYMms2 = numberOr(l, "maxAccelYMms2", limits.maxAccelYMms2);
      limits.maxAccelZMms2 = numberOr(l, "maxAccelZMms2", limits.maxAccelZMms2);
      limits.maxAccelEMms2 = numberOr(l, "maxAccelEMms2", limits.maxAccelEMms2);
    }
    ParserOptions po;
    if (o.Get("parser").IsObject()) {
      Napi::Object p = o.Get("parser").As<Napi::Object>();
      if (p.Get("verifyChecksums").IsBoolean()) po.verifyChecksums = p.Get("verifyChecksums").As<Napi::Boolean>().Value();
      if (auto v = optionalNumber(p, "firmwareRetractMm")) po.firmwareRetractMm = *v;
      if (auto v = optionalNumber(p, "firmwareRetractFeedMms")) po.firmwareRetractFeedMms = *v;
      if (auto v = optionalNumber(p, "arcToleranceMm")) po.arcToleranceMm = *v;
      if (auto v = optionalNumber(p, "maxWarnings")) po.maxWarnings = *v;
    }
    bool withToolpath = !o.Get("toolpath").IsBoolean() || o.Get("toolpath").As<Napi::Boolean>().Value();
    measure_ = std::make_unique<Measurements>(diameter, limits, &workerMachine_);
    if (withToolpath) toolpath_ = std::make_unique<ToolpathSettingsAnalyzer>(diameter);
    pipe_ = std::make_unique<Pipe>();
    fanout_ = std::make_unique<Fanout>(machine_, *pipe_);
    if (o.Get("commentFirstBytes").IsTypedArray()) {
      auto keep = o.Get("commentFirstBytes").As<Napi::Uint8Array>();
      if (keep.ElementLength() == 256)
        for (size_t b = 0; b < 256; b++) fanout_->keepComment[b] = keep[b] != 0;
    }
    parser_ = std::make_unique<Parser>(*fanout_, po, machine_);
    worker_ = std::thread([this] { work(); });
    Napi::MemoryManagement::AdjustExternalMemory(env, kExternalBytes);
  }

  ~Engine() override { stopWorker(); }

 private:
  // The parser's limits (JavaScript thread) and the copy the worker's planner reads.
  MachineState machine_;
  MachineState workerMachine_;
  std::unique_ptr<Measurements> measure_;
  std::unique_ptr<ToolpathSettingsAnalyzer> toolpath_;
  std::unique_ptr<Pipe> pipe_;
  std::unique_ptr<Fanout> fanout_;
  std::unique_ptr<Parser> parser_;
  std::thread worker_;
  bool ended_ = false;

  // Worker thread: the consumers of the parsed stream.
  void work() {
    Measurements& m = *measure_;
    ToolpathSettingsAnalyzer* t = toolpath_.get();
    size_t limitSlots = 0;  // slots of a MotionLimits still to come
    auto* limits = reinterpret_cast<unsigned char*>(static_cast<MotionLimits*>(&workerMachine_));
    pipe_->consume([&](const Event& e) {
      if (limitSlots > 0) {
        const size_t k = kLimitSlots - limitSlots--;
        std::memcpy(limits + k * sizeof(Event), &e, limitBytesInSlot(k));
        return true;
      }
      switch (e.type) {
        case Event::kSegment:
          m.segment(e.s);
          if (t != nullptr) t->segment(e.s);
          return true;
        case Event::kDwell:
          m.dwell(e.timeS, e.lineNo);
          return true;
        case Event::kLimits:
          limitSlots = kLimitSlots;
          return true;
        case Event::kEnd:
          m.end();
          if (t != nullptr) t->end();
          return false;
      }
      return true;
    });
  }

  // Ends the worker: after the end event it has finished; without one (close() or the object being
  // collected mid-stream) it is told to stop.
  void stopWorker() {
    if (!worker_.joinable()) return;
    if (!ended_) pipe_->stop();
    worker_.join();
  }

  // (buf, start, end) with 0 ≤ start ≤ end ≤ buf.length, else a TypeError (never a read out of range).
  bool Range(const Napi::CallbackInfo& info, const uint8_t** data, size_t* start, size_t* end) {
    Napi::Env env = info.Env();
    if (ended_ || closed_) {
      Napi::Error::New(env, "Engine: the stream has ended").ThrowAsJavaScriptException();
      return false;
    }
    if (info.Length() < 3 || !info[0].IsBuffer() || !info[1].IsNumber() || !info[2].IsNumber()) {
      Napi::TypeError::New(env, "expected (buffer, start, end)").ThrowAsJavaScriptException();
      return false;
    }
    auto buf = info[0].As<Napi::Buffer<uint8_t>>();
    double s = info[1].As<Napi::Number>().DoubleValue();
    double e = info[2].As<Napi::Number>().DoubleValue();
    if (!(s >= 0 && s <= e && e <= static_cast<double>(buf.Length()))) {
      Napi::RangeError::New(env, "range outside the buffer").ThrowAsJavaScriptException();
      return false;
    }
    *data = buf.Data();
    *start = static_cast<size_t>(s);
    *end = static_cast<size_t>(e);
    return true;
  }

  Napi::Value Lines(const Napi::CallbackInfo& info) {
    const uint8_t* d;
    size_t s, e;
    if (!Range(info, &d, &s, &e)) return info.Env().Undefined();
    return Napi::Number::New(info.Env(), parser_->lines(d, s, e));
  }

  Napi::Value Line(const Napi::CallbackInfo& info) {
    const uint8_t* d;
    size_t s, e;
    if (!Range(info, &d, &s, &e)) return info.Env().Undefined();
    parser_->line(d, s, e);
    return info.Env().Undefined();
  }

  Napi::Value LongLine(const Napi::CallbackInfo& info) {
    if (!ended_ && !closed_ && info.Length() >= 1 && info[0].IsNumber()) parser_->longLine(info[0].As<Napi::Number>().DoubleValue());
    return info.Env().Undefined();
  }

  Napi::Value TakeComments(const Napi::CallbackInfo& info) {
    Napi::Env env = info.Env();
    if (closed_) return env.Null();
    Fanout& f = *fanout_;
    if (f.commentEnds.empty()) return env.Null();
    Napi::Object out = Napi::Object::New(env);
    out.Set("bytes", Napi::Buffer<char>::Copy(env, f.commentBytes.data(), f.commentBytes.size()));
    auto ends = Napi::Uint32Array::New(env, f.commentEnds.size());
    std::memcpy(ends.Data(), f.commentEnds.data(), f.commentEnds.size() * sizeof(uint32_t));
    auto lines = Napi::Float64Array::New(env, f.commentLines.size());
    std::memcpy(lines.Data(), f.commentLines.data(), f.commentLines.size() * sizeof(double));
    out.Set("ends", ends);
    out.Set("lineNos", lines);
    f.commentBytes.clear();
    f.commentEnds.clear();
    f.commentLines.clear();
    return out;
  }

  Napi::Value End(const Napi::CallbackInfo& info) {
    if (!ended_ && !closed_) {
      parser_->end();
      ended_ = true;
      stopWorker();
    }
    return info.Env().Undefined();
  }

  // Frees the engine's memory now rather than when the collector gets to this object: after the
  // result was taken, or to abandon the stream (the reader failed; the worker is stopped).
  Napi::Value Close(const Napi::CallbackInfo& info) {
    if (!closed_) {
      stopWorker();
      closed_ = true;
      parser_.reset();
      fanout_.reset();
      pipe_.reset();
      toolpath_.reset();
      measure_.reset();
      Napi::MemoryManagement::AdjustExternalMemory(info.Env(), -kExternalBytes);
    }
    return info.Env().Undefined();
  }
  bool closed_ = false;
  // Roughly what one engine holds outside the JavaScript heap (the ring, the measurements' object
  // grid, the toolpath layer buffers), reported to V8 so it collects abandoned engines in time.
  static constexpr int64_t kExternalBytes = 12 << 20;

  Napi::Value Result(const Napi::CallbackInfo& info) {
    if (!ended_ || closed_) {
      Napi::Error::New(info.Env(), "Engine: result() before end()").ThrowAsJavaScriptException();
      return info.Env().Undefined();
    }
    Json j;
    j.beginObject();
    j.key("parser");
    parser_->toJson(j);
    j.key("measure");
    measure_->toJson(j);
    j.key("toolpath");
    if (toolpath_) toolpath_->toJson(j);
    else j.null();
    j.endObject();
    return Napi::String::New(info.Env(), j.out);
  }
};

Napi::Object Init(Napi::Env env, Napi::Object exports) {
  exports.Set("Engine", Engine::Define(env));
  exports.Set("version", Napi::Number::New(env, 1));
  return exports;
}

}  // namespace

NODE_API_MODULE(hotlap_inspection, Init)

#include "src/capture/frame_selection.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <deque>
#include <optional>
#include <stdexcept>
#include <string>

#include "src/capture/capture_error.hpp"
#include "src/capture/release_detection.hpp"
#include "src/capture/video_reader.hpp"

namespace spreadfit::capture {

namespace {

constexpr const char* not_still_at_start =
    "release not detectable: the video does not start still (expected a second or so of the plate before the ring "
    "or gate moves; or give the time, such as release = \"2.4 s\", in [capture])";

// Which frames to keep, decided frame by frame: the reading times still to be served, and the thinning of the
// still frames before the release.
class FramePicker {
 public:
  FramePicker(const io::CaptureSettings& s, const CaptureOptions& o, double interval, DecodedVideo& out)
      : s_(s), o_(o), interval_(interval), out_(out) {}

  /// The k-th reading time after the release (the list given, or every `every`); none past the list's end.
  std::optional<double> target(std::size_t k) const {
    if (!s_.times.empty()) return k < s_.times.size() ? std::optional<double>(s_.times[k]) : std::nullopt;
    return static_cast<double>(k + 1) * s_.every;
  }
  /// A frame at t serves the next reading when it is the first at (or within half a frame before) its time.
  bool wanted(const std::optional<double>& release, double t) const {
    const auto next_time = target(next_);
    return release && next_time && t >= *release + *next_time - 0.5 * interval_;
  }
  /// Keeps a reading frame; one frame serves all the times it is nearest to.
  void take(const std::optional<double>& release, KeptFrame k) {
    if (static_cast<int>(out_.readings.size()) >= o_.max_readings)
      throw std::invalid_argument(fmt::format(
          "capture: more than {} readings asked for (expected a longer interval, every, or fewer times)",
          o_.max_readings));
    while (wanted(release, k.time)) ++next_;
    out_.readings.push_back(std::move(k));
  }
  /// Every step-th frame is a still candidate; past 16, every second one is dropped (8 spread over the still start
  /// remain) and half as many are taken from then on.
  bool still_candidate(int index) const { return index % static_cast<int>(step_) == 0; }
  void keep_still(KeptFrame k) {
    if (!still_candidate(k.index)) return;
    out_.stills.push_back(std::move(k));
    if (out_.stills.size() > 16) {
      std::vector<KeptFrame> thinned;
      for (std::size_t i = 0; i < out_.stills.size(); i += 2) thinned.push_back(std::move(out_.stills[i]));
      out_.stills = std::move(thinned);
      step_ *= 2;
    }
  }
  void set_interval(double interval) { interval_ = interval; }
  double interval() const { return interval_; }
  bool all_read() const { return !target(next_); }
  std::size_t served() const { return next_; }

 private:
  const io::CaptureSettings& s_;
  const CaptureOptions& o_;
  double interval_;        // [s] between frames (nominal, then measured)
  DecodedVideo& out_;
  std::size_t next_ = 0;   // next reading time
  std::size_t step_ = 1;
};

}  // namespace

DecodedVideo decode_video(const io::CaptureSettings& s, const CaptureOptions& o) {
  VideoReader video(s.video);
  DecodedVideo out;
  out.width = video.width();
  out.height = video.height();
  out.nominal_rate = video.nominal_rate();
  // A quarter of a second between the frames compared (3 to 8 frames): slow drifts stay small, and a video
  // needs about half a second of stillness before the release at any frame rate.
  ReleaseOptions release_options;
  const double rate = video.nominal_rate() > 0 ? video.nominal_rate() : 30.0;
  release_options.lag = std::clamp(static_cast<int>(std::lround(0.25 * rate)), 3, 8);
  ReleaseDetector detector(release_options);
  std::optional<double> release = s.release;
  int release_index = -1;
  FramePicker pick(s, o, video.nominal_rate() > 0 ? 1.0 / video.nominal_rate() : 1.0 / 30.0, out);
  std::deque<KeptFrame> recent;  // auto release: the frames the detector saw after the release

  while (video.grab()) {
    if (video.index() >= o.max_frames)
      throw std::invalid_argument(fmt::format("capture: the video has more than {} frames", o.max_frames));
    const double t = video.time();
    if (!out.times.empty() && video.index() > 0)
      pick.set_interval((t - out.times.front()) / static_cast<double>(video.index()));
    out.times.push_back(t);
    if (!release) {  // detecting: every frame is looked at until something moves
      KeptFrame k{t, video.index(), video.retrieve()};
      recent.push_back(KeptFrame{t, k.index, k.image});
      if (recent.size() > 8) recent.pop_front();
      const bool done = detector.add(k.image, t);
      pick.keep_still(std::move(k));
      if (done) {
        release = detector.release_time();
        release_index = detector.release_index();
        out.detected = true;
        for (KeptFrame& r : recent)
          if (r.index >= release_index && pick.wanted(release, r.time)) pick.take(release, std::move(r));
      }
      continue;
    }
    if (t < *release - 1.5 * pick.interval()) {
      if (pick.still_candidate(video.index())) pick.keep_still(KeptFrame{t, video.index(), video.retrieve()});
      continue;
    }
    if (pick.wanted(release, t)) pick.take(release, KeptFrame{t, video.index(), video.retrieve()});
    if (pick.all_read()) break;  // every time given is read: the rest of the video is not needed
  }
  out.from_container = video.timestamps_from_container();
  if (out.times.empty()) throw std::runtime_error("cannot be read as a video (no frame decodes)");

  if (!release && detector.moving_from_start()) throw NotFoundInVideo(not_still_at_start);
  if (!release)
    throw NotFoundInVideo(
        "no release found: nothing moves in the video after its still start (expected the ring or gate to be "
        "lifted in view; or give the time, such as release = \"2.4 s\", in [capture])");
  out.release = *release;
  if (out.detected) {
    std::erase_if(out.stills, [&](const KeptFrame& k) { return k.index >= release_index - 1; });
    if (release_index <= release_options.lag + 1 || out.stills.empty()) throw NotFoundInVideo(not_still_at_start);
  } else {
    if (*release > out.times.back())
      throw std::invalid_argument(fmt::format("capture.release: {} is after the video's end ({})", seconds_text(*release),
                                              seconds_text(out.times.back())));
    std::erase_if(out.stills, [&](const KeptFrame& k) { return k.time >= *release - 1.5 * pick.interval(); });
    if (out.stills.empty())
      throw std::invalid_argument(fmt::format(
          "capture.release: {} leaves no still frame before the release (expected at least one frame of the "
          "plate before the ring or gate moves)",
          seconds_text(*release)));
  }
  if (!s.times.empty()) out.targets_missed = s.times.size() - std::min(pick.served(), s.times.size());
  if (out.readings.empty())
    throw NotFoundInVideo(fmt::format("no reading: the video ends {} after the release, before the first reading "
                                      "time ({})",
                                      seconds_text(out.times.back() - out.release), seconds_text(*pick.target(0))));
  return out;
}

}  // namespace spreadfit::capture

#include "src/capture/audit_images.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <opencv2/calib3d.hpp>
#include <opencv2/imgcodecs.hpp>
#include <opencv2/imgproc.hpp>
#include <system_error>

#include "src/io/atomic_file.hpp"
#include "src/io/input_error.hpp"

namespace spreadfit::capture {

namespace {

const cv::Scalar kGreen(40, 200, 40), kBlue(230, 120, 20), kRed(40, 40, 220), kBlack(0, 0, 0), kWhite(255, 255, 255),
    kGrey(150, 150, 150);

void write_png(const std::filesystem::path& file, const cv::Mat& image) {
  std::vector<uchar> bytes;
  if (!cv::imencode(".png", image, bytes)) throw io::InputError(file.string(), 0, "", "cannot encode the PNG image");
  io::write_file_atomically(file, std::string_view(reinterpret_cast<const char*>(bytes.data()), bytes.size()));
}

std::string reading_label(const CaptureResult& r, const CapturedReading& reading) {
  return fmt::format("t = {:.2f} s   {} {:.2f} mm", reading.time, r.reading == Reading::Diameter ? "diameter" : "front",
                     reading.value);
}

/// Text on a light box, so it reads on any frame.
void label(cv::Mat& image, const std::string& text, cv::Point origin, double scale) {
  int baseline = 0;
  const int thickness = std::max(1, static_cast<int>(std::lround(scale * 1.5)));
  const cv::Size size = cv::getTextSize(text, cv::FONT_HERSHEY_SIMPLEX, scale, thickness, &baseline);
  cv::rectangle(image, cv::Rect(origin.x - 4, origin.y - size.height - 4, size.width + 8, size.height + baseline + 8),
                kWhite, cv::FILLED);
  cv::putText(image, text, origin, cv::FONT_HERSHEY_SIMPLEX, scale, kBlack, thickness, cv::LINE_AA);
}

cv::Mat annotated(const CaptureResult& r, std::size_t i) {
  cv::Mat image = r.frames_measured[i].clone();
  const double scale = std::max(0.4, image.cols / 1600.0);
  const int thick = std::max(1, image.cols / 600);
  const CaptureReference& ref = r.reference;
  if (!ref.board_corners.empty()) {
    std::vector<cv::Point2f> corners = ref.board_corners;
    for (const cv::Point2f& c : corners) cv::circle(image, c, 2 * thick + 1, kRed, thick, cv::LINE_AA);
  }
  if (!ref.initial_outline.empty())
    cv::polylines(image, std::vector<std::vector<cv::Point>>{ref.initial_outline}, true, kBlue, thick, cv::LINE_AA);
  if (r.reading == Reading::Front) {
    cv::line(image, ref.gate_a, ref.gate_b, kRed, thick + 1, cv::LINE_AA);
    cv::line(image, 0.5 * (ref.gate_a + ref.gate_b), ref.axis_end, kGrey, thick, cv::LINE_AA);
  }
  const CapturedReading& reading = r.readings[i];
  if (!reading.outline.empty())
    cv::polylines(image, std::vector<std::vector<cv::Point>>{reading.outline}, true, kGreen, thick, cv::LINE_AA);
  const int line = static_cast<int>(40 * scale) + 8;
  label(image, reading_label(r, reading), cv::Point(10, line), scale);
  label(image,
        fmt::format("video {:.3f} s, frame {}, {:.2f} px/mm ({})", reading.video_time, reading.frame, r.pixels_per_mm,
                    r.scale_source),
        cv::Point(10, 2 * line + 4), 0.7 * scale);
  return image;
}

/// Tick spacing of 1, 2 or 5 times a power of ten, about `count` ticks over `span`.
double tick_step(double span, int count) {
  const double raw = span / count;
  const double power = std::pow(10.0, std::floor(std::log10(raw)));
  for (double m : {1.0, 2.0, 5.0, 10.0})
    if (raw <= m * power) return m * power;
  return 10 * power;
}

cv::Mat curve(const CaptureResult& r) {
  const int width = 900, height = 560, left = 90, right = 30, top = 50, bottom = 70;
  cv::Mat image(height, width, CV_8UC3, kWhite);
  double t_max = 0, v_min = 1e300, v_max = 0;
  for (const CapturedReading& p : r.readings) {
    t_max = std::max(t_max, p.time);
    v_min = std::min(v_min, p.value);
    v_max = std::max(v_max, p.value);
  }
  t_max = t_max > 0 ? t_max * 1.05 : 1;
  double v_low = r.reading == Reading::Front ? 0.0 : std::max(0.0, v_min - 0.1 * (v_max - v_min + 1));
  double v_high = v_max + 0.08 * (v_max - v_low + 1);
  const double t_step = tick_step(t_max, 8), v_step = tick_step(v_high - v_low, 6);
  v_low = std::floor(v_low / v_step) * v_step;
  auto x_of = [&](double t) { return left + (width - left - right) * t / t_max; };
  auto y_of = [&](double v) { return height - bottom - (height - top - bottom) * (v - v_low) / (v_high - v_low); };
  cv::rectangle(image, cv::Point(left, top), cv::Point(width - right, height - bottom), kBlack, 1);
  for (double t = 0; t <= t_max + 1e-9; t += t_step) {
    const int x = static_cast<int>(x_of(t));
    cv::line(image, cv::Point(x, height - bottom), cv::Point(x, height - bottom + 6), kBlack, 1);
    cv::putText(image, fmt::format("{:g}", t), cv::Point(x - 10, height - bottom + 24), cv::FONT_HERSHEY_SIMPLEX, 0.5,
                kBlack, 1, cv::LINE_AA);
  }
  for (double v = v_low; v <= v_high + 1e-9; v += v_step) {
    const int y = static_cast<int>(y_of(v));
    cv::line(image, cv::Point(left - 6, y), cv::Point(left, y), kBlack, 1);
    cv::putText(image, fmt::format("{:g}", v), cv::Point(left - 60, y + 5), cv::FONT_HERSHEY_SIMPLEX, 0.5, kBlack, 1,
                cv::LINE_AA);
  }
  const std::string name = r.reading == Reading::Diameter ? "diameter [mm]" : "front [mm]";
  cv::putText(image, "time since the release [s]", cv::Point(width / 2 - 120, height - 20), cv::FONT_HERSHEY_SIMPLEX,
              0.6, kBlack, 1, cv::LINE_AA);
  cv::putText(image, name, cv::Point(10, 30), cv::FONT_HERSHEY_SIMPLEX, 0.6, kBlack, 1, cv::LINE_AA);
  std::vector<cv::Point> line;
  for (const CapturedReading& p : r.readings)
    line.emplace_back(static_cast<int>(x_of(p.time)), static_cast<int>(y_of(p.value)));
  cv::polylines(image, std::vector<std::vector<cv::Point>>{line}, false, kBlue, 1, cv::LINE_AA);
  for (const cv::Point& p : line) cv::circle(image, p, 4, kBlue, cv::FILLED, cv::LINE_AA);
  return image;
}

}  // namespace

std::vector<std::filesystem::path> write_audit_images(const CaptureResult& result, const std::filesystem::path& dir,
                                                      const std::string& stem, int frames) {
  std::error_code ec;
  std::filesystem::create_directories(dir, ec);
  if (ec || !std::filesystem::is_directory(dir))
    throw io::InputError(dir.string(), 0, "--check", "cannot create the folder for the audit images");
  std::vector<std::filesystem::path> written;
  const std::size_t n = result.readings.size();
  std::vector<std::size_t> chosen;
  const std::size_t count = std::min<std::size_t>(n, static_cast<std::size_t>(std::max(frames, 1)));
  for (std::size_t k = 0; k < count; ++k) {
    const std::size_t i = count == 1 ? n - 1 : (k * (n - 1)) / (count - 1);
    if (chosen.empty() || chosen.back() != i) chosen.push_back(i);
  }
  std::vector<cv::Mat> tiles;
  for (std::size_t k = 0; k < chosen.size(); ++k) {
    const cv::Mat image = annotated(result, chosen[k]);
    const auto file = dir / fmt::format("{}-{}-{:.1f}s.png", stem, k + 1, result.readings[chosen[k]].time);
    write_png(file, image);
    written.push_back(file);
    cv::Mat tile;
    const double f = 480.0 / image.cols;
    cv::resize(image, tile, cv::Size(), f, f, cv::INTER_AREA);
    tiles.push_back(tile);
  }
  // Contact sheet: three tiles a row.
  const int columns = std::min<int>(3, static_cast<int>(tiles.size()));
  const int rows = (static_cast<int>(tiles.size()) + columns - 1) / columns;
  const int tw = tiles.front().cols, th = tiles.front().rows, gap = 6;
  cv::Mat sheet(rows * (th + gap) + gap, columns * (tw + gap) + gap, CV_8UC3, kWhite);
  for (std::size_t k = 0; k < tiles.size(); ++k) {
    const int c = static_cast<int>(k) % columns, r = static_cast<int>(k) / columns;
    tiles[k].copyTo(sheet(cv::Rect(gap + c * (tw + gap), gap + r * (th + gap), tw, th)));
  }
  const auto sheet_file = dir / (stem + "-sheet.png");
  write_png(sheet_file, sheet);
  written.push_back(sheet_file);
  const auto curve_file = dir / (stem + "-curve.png");
  write_png(curve_file, curve(result));
  written.push_back(curve_file);
  return written;
}

}  // namespace spreadfit::capture

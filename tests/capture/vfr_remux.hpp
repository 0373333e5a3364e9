// Giving a rendered video a variable frame rate: its packets copied, without re-encoding, into a Matroska file
// whose timestamps are the times given (FFmpeg's libavformat, the library OpenCV's FFmpeg backend reads with).
// Phones write such files; OpenCV's writer can only write a constant rate. The source must have no reordered
// frames (MJPEG: every frame a key frame), so frame k is packet k.
#pragma once

extern "C" {
#include <libavformat/avformat.h>
}

#include <cmath>
#include <filesystem>
#include <stdexcept>
#include <string>
#include <vector>

namespace spreadfit::capture::test {

inline void retime_video(const std::filesystem::path& in, const std::filesystem::path& out,
                         const std::vector<double>& times) {
  AVFormatContext* input = nullptr;
  if (avformat_open_input(&input, in.c_str(), nullptr, nullptr) < 0)
    throw std::runtime_error("cannot open " + in.string());
  auto close_input = [&] { avformat_close_input(&input); };
  if (avformat_find_stream_info(input, nullptr) < 0 || input->nb_streams < 1) {
    close_input();
    throw std::runtime_error("no stream in " + in.string());
  }
  AVFormatContext* output = nullptr;
  avformat_alloc_output_context2(&output, nullptr, "matroska", out.c_str());
  if (!output) {
    close_input();
    throw std::runtime_error("cannot make a Matroska muxer");
  }
  AVStream* stream = avformat_new_stream(output, nullptr);
  avcodec_parameters_copy(stream->codecpar, input->streams[0]->codecpar);
  stream->codecpar->codec_tag = 0;
  stream->time_base = AVRational{1, 1000};
  bool ok = avio_open(&output->pb, out.c_str(), AVIO_FLAG_WRITE) >= 0 && avformat_write_header(output, nullptr) >= 0;
  AVPacket* packet = av_packet_alloc();
  std::size_t k = 0;
  while (ok && av_read_frame(input, packet) >= 0) {
    if (packet->stream_index == 0 && k < times.size()) {
      const auto ms = static_cast<int64_t>(std::llround(times[k] * 1000.0));
      packet->pts = packet->dts = av_rescale_q(ms, AVRational{1, 1000}, stream->time_base);
      packet->duration = 0;
      packet->pos = -1;
      packet->stream_index = 0;
      ok = av_interleaved_write_frame(output, packet) >= 0;
      ++k;
    }
    av_packet_unref(packet);
  }
  av_packet_free(&packet);
  if (ok) ok = av_write_trailer(output) >= 0;
  avio_closep(&output->pb);
  avformat_free_context(output);
  close_input();
  if (!ok || k != times.size()) throw std::runtime_error("could not retime " + in.string() + " into " + out.string());
}

}  // namespace spreadfit::capture::test

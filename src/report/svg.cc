#include "report/svg.h"

#include <fmt/format.h>

#include <cmath>

namespace alphatrail::report {

std::string escape(std::string_view text) {
  std::string out;
  out.reserve(text.size());
  for (char c : text) {
    switch (c) {
      case '&': out += "&amp;"; break;
      case '<': out += "&lt;"; break;
      case '>': out += "&gt;"; break;
      case '"': out += "&quot;"; break;
      case '\'': out += "&apos;"; break;
      default: out += c;
    }
  }
  return out;
}

std::string number(double value) {
  if (!std::isfinite(value)) return "0";
  // Two decimals are a hundredth of a viewBox unit: far below a printed dot, and fixed
  // precision keeps the output byte-for-byte stable across runs and platforms.
  std::string text = fmt::format("{:.2f}", value);
  while (text.back() == '0') text.pop_back();
  if (text.back() == '.') text.pop_back();
  if (text == "-0") text = "0";
  return text;
}

std::string path_data(const std::vector<Point>& points, bool closed) {
  std::string d;
  for (std::size_t i = 0; i < points.size(); ++i)
    d += fmt::format("{}{} {}", i == 0 ? 'M' : 'L', number(points[i].x), number(points[i].y));
  if (points.size() == 1) d += fmt::format("L{} {}", number(points[0].x), number(points[0].y));
  if (closed && !points.empty()) d += 'Z';
  return d;
}

void SvgWriter::add_attribute(std::string_view name, std::string_view value) {
  out_ += fmt::format(" {}=\"{}\"", name, escape(value));
}

void SvgWriter::end_text(std::string_view name, std::string_view content) {
  out_ += fmt::format(">{}</{}>\n", escape(content), name);
}

SvgWriter& SvgWriter::close() {
  if (open_.empty()) return *this;
  out_ += fmt::format("</{}>\n", open_.back());
  open_.pop_back();
  return *this;
}

std::string SvgWriter::finish() {
  while (!open_.empty()) close();
  return out_;
}

}  // namespace alphatrail::report

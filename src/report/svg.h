// A tiny SVG writer: elements and attributes built into one string, XML escaping of text and
// attribute values, and numbers written with at most two decimals so the same chart always
// gives the same bytes. The writer owns its buffer; finish() returns it. Nothing validates
// element or attribute names: callers use fixed SVG names, and every piece of outside text
// (titles, labels, series names) goes through escape().
#pragma once

#include <string>
#include <string_view>
#include <vector>

namespace alphatrail::report {

// Escapes the five XML special characters & < > " ' for text and attribute values.
// Example: escape("a<b & 'c'") == "a&lt;b &amp; &apos;c&apos;".
std::string escape(std::string_view text);

// Writes a coordinate or length with at most two decimals, trailing zeros dropped, never "-0";
// a non-finite value (which the charts never pass) is written as 0.
// Example: number(12.346) == "12.35", number(3.0) == "3", number(-0.001) == "0".
std::string number(double value);

struct Point {
  double x = 0.0;
  double y = 0.0;
};

// Returns SVG path data through the points, "M x y L x y ...", closed with Z on request; an
// empty string for no point. A single point gives a zero-length line (a dot with round caps).
// Example: path_data({{0, 1}, {2, 3}}) == "M0 1L2 3".
std::string path_data(const std::vector<Point>& points, bool closed = false);

namespace detail {
inline std::string attribute_text(std::string_view value) {
  return std::string(value);
}
inline std::string attribute_text(double value) {
  return number(value);
}
}  // namespace detail

// Builds SVG text one element per line. Attributes follow the element name as name, value
// pairs; a value is text or a number (written by number()). open() and close() nest, finish()
// closes what is still open.
//   SvgWriter w;
//   w.open("svg", "viewBox", "0 0 10 10").leaf("circle", "r", 2.5).finish();
//   // <svg viewBox="0 0 10 10">\n<circle r="2.5"/>\n</svg>\n
class SvgWriter {
 public:
  // Starts <name attributes...>; close() ends the innermost open element.
  template <class... NameValue>
  SvgWriter& open(std::string_view name, const NameValue&... attributes) {
    start_tag(name, attributes...);
    out_ += ">\n";
    open_.emplace_back(name);
    return *this;
  }

  SvgWriter& close();

  // Writes an element without content, <name attributes.../>.
  template <class... NameValue>
  SvgWriter& leaf(std::string_view name, const NameValue&... attributes) {
    start_tag(name, attributes...);
    out_ += "/>\n";
    return *this;
  }

  // Writes <name attributes...>escaped content</name>.
  template <class... NameValue>
  SvgWriter& text(std::string_view name, std::string_view content, const NameValue&... attributes) {
    start_tag(name, attributes...);
    end_text(name, content);
    return *this;
  }

  // Closes every open element and returns the text.
  std::string finish();

 private:
  template <class... NameValue>
  void start_tag(std::string_view name, const NameValue&... attributes) {
    static_assert(sizeof...(NameValue) % 2 == 0, "attributes come in name, value pairs");
    out_ += '<';
    out_ += name;
    add(attributes...);
  }
  void add() {}
  template <class Value, class... Rest>
  void add(std::string_view name, const Value& value, const Rest&... rest) {
    add_attribute(name, detail::attribute_text(value));
    add(rest...);
  }
  void add_attribute(std::string_view name, std::string_view value);
  void end_text(std::string_view name, std::string_view content);

  std::string out_;
  std::vector<std::string> open_;
};

}  // namespace alphatrail::report

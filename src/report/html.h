// A self-contained HTML page: one file with its style sheet inline, no script, no font and
// no image from anywhere else, so it opens offline and prints on A4 or Letter. Pure
// computation: the caller writes the returned text to a file.
//
// A page is a header (title, subtitle, facts) and sections; a section holds blocks in order:
// paragraphs, bullet lists, charts (SVG text from charts.h with a caption), tables and
// key-value lists. Every piece of text is escaped here (svg.h's escape, valid for HTML too);
// only chart SVG is taken as it is.
#pragma once

#include <string>
#include <utility>
#include <variant>
#include <vector>

namespace alphatrail::report {

struct Paragraph {
  std::string text;
  bool caution = false;  // drawn as a caution (the cautions box, short-sample warnings)
};

struct BulletList {
  std::vector<std::string> items;
};

struct Figure {
  std::string svg;      // one <svg> element from charts.h
  std::string caption;  // what the chart shows and in which units
};

struct HtmlTable {
  std::vector<std::string> header;
  std::vector<std::vector<std::string>> rows;
  std::vector<bool> numeric;  // per column: right-aligned, tabular figures
  std::string caption;
  bool monospace_last = false;  // the last column holds hashes or parameters
};

struct Facts {
  std::vector<std::pair<std::string, std::string>> items;  // label, value
};

using Block = std::variant<Paragraph, BulletList, Figure, HtmlTable, Facts>;

struct Section {
  std::string title;
  std::vector<Block> blocks;
};

struct Page {
  std::string title;     // the <title> and the heading
  std::string subtitle;  // one line under the heading
  Facts facts;           // the header's key facts
  std::vector<Section> sections;
  std::string footer;  // e.g. how and when the page was made
};

// Returns true when the text is a page render_page wrote (its generator mark, or for pages of
// earlier versions their head and "Made by alphatrail" footer): the files `report -o` may
// replace without --force.
bool is_our_page(const std::string& text);

// Returns the whole HTML document.
// Example: render_page({.title = "Run 7: trend-12m"}) starts with "<!DOCTYPE html>".
std::string render_page(const Page& page);

}  // namespace alphatrail::report

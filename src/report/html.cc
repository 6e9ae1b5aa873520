#include "report/html.h"

#include <fmt/format.h>

#include <string_view>

#include "report/svg.h"

namespace alphatrail::report {

namespace {

// Ours: paper-like page, one accent (the charts' dark blue), cautions in the charts'
// vermillion; figures and tables never split across printed pages.
constexpr const char* kStyle = R"css(
:root { --ink: #222; --muted: #5b5b5b; --rule: #d8d4cc; --accent: #1b3f73; --warn: #c24a1c; }
* { box-sizing: border-box; }
html { background: #f4f2ed; }
body { margin: 0 auto; max-width: 980px; padding: 28px 32px 40px; background: #fffdf9;
  color: var(--ink); font: 15px/1.5 system-ui, "DejaVu Sans", sans-serif; }
header.masthead { border-bottom: 3px double var(--accent); padding-bottom: 12px; margin-bottom: 8px; }
header.masthead h1 { margin: 0 0 2px; font-size: 26px; color: var(--accent); letter-spacing: .01em; }
header.masthead p.subtitle { margin: 0 0 10px; color: var(--muted); }
dl.facts { display: grid; grid-template-columns: max-content 1fr max-content 1fr; gap: 2px 16px;
  margin: 8px 0 0; font-size: 13.5px; }
dl.facts dt { color: var(--muted); }
dl.facts dd { margin: 0; overflow-wrap: anywhere; }
section { margin-top: 22px; }
section > h2 { font-size: 18px; margin: 0 0 8px; padding-bottom: 3px; color: var(--accent);
  border-bottom: 1px solid var(--rule); }
figure { margin: 10px 0 16px; break-inside: avoid; page-break-inside: avoid; }
figure svg { display: block; width: 100%; height: auto; }
figcaption { font-size: 13px; color: var(--muted); margin-top: 2px; }
table { border-collapse: collapse; width: 100%; margin: 6px 0 14px; font-size: 13.5px;
  break-inside: avoid; page-break-inside: avoid; }
caption { text-align: left; font-size: 13px; color: var(--muted); padding-bottom: 4px; }
th { text-align: left; font-weight: 600; border-bottom: 1.5px solid var(--ink); padding: 3px 8px; }
td { border-bottom: 1px solid var(--rule); padding: 3px 8px; vertical-align: top; }
th.num, td.num { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
td.mono { font-family: ui-monospace, "DejaVu Sans Mono", monospace; font-size: 12px;
  overflow-wrap: anywhere; }
p.caution, ul.caution { border-left: 4px solid var(--warn); background: #fbf1ec;
  padding: 6px 10px; margin: 8px 0; }
ul { padding-left: 22px; }
footer { margin-top: 28px; border-top: 1px solid var(--rule); padding-top: 6px; font-size: 12px;
  color: var(--muted); }
@page { margin: 14mm; }
@media print {
  html, body { background: #fff; }
  body { max-width: none; padding: 0; font-size: 11pt; }
  section { break-inside: auto; }
  section > h2 { break-after: avoid; page-break-after: avoid; }
}
)css";

std::string row_cells(const std::vector<std::string>& cells, const HtmlTable& t, bool header) {
  std::string out = "<tr>";
  for (std::size_t c = 0; c < cells.size(); ++c) {
    std::string cls;
    if (c < t.numeric.size() && t.numeric[c]) cls = "num";
    if (!header && t.monospace_last && c + 1 == cells.size()) cls += cls.empty() ? "mono" : " mono";
    const char* tag = header ? "th" : "td";
    out += fmt::format("<{}{}>{}</{}>", tag, cls.empty() ? "" : " class=\"" + cls + "\"",
                       escape(cells[c]), tag);
  }
  return out + "</tr>\n";
}

std::string facts_html(const Facts& facts) {
  if (facts.items.empty()) return "";
  std::string out = "<dl class=\"facts\">\n";
  for (const auto& [label, value] : facts.items)
    out += fmt::format("<dt>{}</dt><dd>{}</dd>\n", escape(label), escape(value));
  return out + "</dl>\n";
}

struct BlockHtml {
  std::string operator()(const Paragraph& p) const {
    return fmt::format("<p{}>{}</p>\n", p.caution ? " class=\"caution\"" : "", escape(p.text));
  }
  std::string operator()(const BulletList& l) const {
    std::string out = "<ul>\n";
    for (const auto& item : l.items) out += "<li>" + escape(item) + "</li>\n";
    return out + "</ul>\n";
  }
  std::string operator()(const Figure& f) const {
    return fmt::format("<figure>\n{}<figcaption>{}</figcaption>\n</figure>\n", f.svg,
                       escape(f.caption));
  }
  std::string operator()(const HtmlTable& t) const {
    std::string out = "<table>\n";
    if (!t.caption.empty()) out += "<caption>" + escape(t.caption) + "</caption>\n";
    out += "<thead>" + row_cells(t.header, t, true) + "</thead>\n<tbody>\n";
    for (const auto& row : t.rows) out += row_cells(row, t, false);
    return out + "</tbody>\n</table>\n";
  }
  std::string operator()(const Facts& f) const { return facts_html(f); }
};

}  // namespace

namespace {

constexpr std::string_view kPageStart =
    "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n";
// The HTML standard's generator mark, so the tool can recognise its own pages.
constexpr std::string_view kGeneratorMark = "<meta name=\"generator\" content=\"alphatrail\">\n";

}  // namespace

bool is_our_page(const std::string& text) {
  if (text.rfind(kPageStart, 0) != 0) return false;
  const std::size_t head_end = text.find("</head>");
  if (head_end == std::string::npos) return false;
  return text.find(kGeneratorMark) < head_end ||
         text.find("<footer>Made by alphatrail ", head_end) != std::string::npos;
}

std::string render_page(const Page& page) {
  std::string out(kPageStart);
  out += kGeneratorMark;
  out += "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n";
  out += "<title>" + escape(page.title) + "</title>\n<style>" + kStyle + "</style>\n";
  out += "</head>\n<body>\n<header class=\"masthead\">\n";
  out += "<h1>" + escape(page.title) + "</h1>\n";
  if (!page.subtitle.empty()) out += "<p class=\"subtitle\">" + escape(page.subtitle) + "</p>\n";
  out += facts_html(page.facts) + "</header>\n";
  for (const auto& section : page.sections) {
    out += "<section>\n<h2>" + escape(section.title) + "</h2>\n";
    for (const auto& block : section.blocks) out += std::visit(BlockHtml{}, block);
    out += "</section>\n";
  }
  if (!page.footer.empty()) out += "<footer>" + escape(page.footer) + "</footer>\n";
  return out + "</body>\n</html>\n";
}

}  // namespace alphatrail::report

#include "cli/render.h"

#include <fmt/format.h>

#include <cstdint>
#include <utility>

namespace alphatrail::cli {

void render(std::ostream& out, const View& view, Format format) {
  switch (format) {
    case Format::json: print_json(out, view.json); return;
    case Format::csv: print_csv(out, view.table); return;
    case Format::table: break;
  }
  if (view.table.rows.empty() && !view.when_empty.empty()) {
    out << view.when_empty;
    return;
  }
  print_table(out, view.table);
  if (!view.footnote.empty()) out << '\n' << view.footnote;
}

namespace {

using store::QueryValue;

// Returns a cell as text: an integer in full, a double in its shortest exact form, text and
// blobs as stored, NULL as `null_text`.
std::string cell_text(const QueryValue& value, const char* null_text) {
  switch (value.type) {
    case QueryValue::Type::null: return null_text;
    case QueryValue::Type::integer: return std::to_string(value.integer);
    case QueryValue::Type::real: return fmt::format("{}", value.real);
    case QueryValue::Type::text:
    case QueryValue::Type::blob: break;
  }
  return value.bytes;
}

class CsvRows : public RowRenderer {
 public:
  CsvRows(std::ostream& out, const std::vector<std::string>& names) : out_(out) {
    print_csv_row(out_, names);
  }
  void row(const std::vector<QueryValue>& values) override {
    cells_.clear();
    for (const QueryValue& value : values) cells_.push_back(cell_text(value, ""));
    print_csv_row(out_, cells_);
  }
  void finish() override {}

 private:
  std::ostream& out_;
  std::vector<std::string> cells_;
};

// A JSON array of one object per row, as print_json prints it, written row by row.
class JsonRows : public RowRenderer {
 public:
  JsonRows(std::ostream& out, const std::vector<std::string>& names) : out_(out), names_(names) {
    out_ << '[';
  }
  void row(const std::vector<QueryValue>& values) override {
    nlohmann::ordered_json object = nlohmann::ordered_json::object();
    for (std::size_t c = 0; c < values.size(); ++c) {
      auto& value = object[names_[c]];
      switch (values[c].type) {
        case QueryValue::Type::null: value = nullptr; break;
        case QueryValue::Type::integer: value = values[c].integer; break;
        case QueryValue::Type::real: value = json_number(values[c].real); break;
        case QueryValue::Type::text:
        case QueryValue::Type::blob: value = values[c].bytes;
      }
    }
    // Indented one level deeper, as inside the array (JSON text holds no raw line breaks).
    std::string text = rows_ == 0 ? "\n  " : ",\n  ";
    // Text that is not UTF-8 (a blob cast to text) prints as U+FFFD rather than failing.
    for (const char c : object.dump(2, ' ', false, nlohmann::json::error_handler_t::replace)) {
      text += c;
      if (c == '\n') text += "  ";
    }
    out_.write(text.data(), static_cast<std::streamsize>(text.size()));
    ++rows_;
  }
  void finish() override { out_ << (rows_ == 0 ? "]\n" : "\n]\n"); }

 private:
  std::ostream& out_;
  std::vector<std::string> names_;
  std::int64_t rows_ = 0;
};

class TableRows : public RowRenderer {
 public:
  TableRows(std::ostream& out, const std::vector<std::string>& names) : table_(out, names) {}
  void row(const std::vector<QueryValue>& values) override {
    std::vector<std::string> cells;
    cells.reserve(values.size());
    numbers_.assign(values.size(), false);
    for (std::size_t c = 0; c < values.size(); ++c) {
      numbers_[c] =
          values[c].type == QueryValue::Type::integer || values[c].type == QueryValue::Type::real;
      cells.push_back(cell_text(values[c], "NULL"));
    }
    table_.add(std::move(cells), numbers_);
  }
  void finish() override { table_.finish(); }

 private:
  StreamedTable table_;
  std::vector<bool> numbers_;
};

}  // namespace

std::unique_ptr<RowRenderer> row_renderer(Format format, std::ostream& out,
                                          const std::vector<std::string>& names) {
  switch (format) {
    case Format::json: return std::make_unique<JsonRows>(out, names);
    case Format::csv: return std::make_unique<CsvRows>(out, names);
    case Format::table: break;
  }
  return std::make_unique<TableRows>(out, names);
}

}  // namespace alphatrail::cli

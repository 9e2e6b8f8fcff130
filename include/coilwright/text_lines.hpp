#pragma once
// Reading text inputs (point lists, surveys, readings) line by line with bounded memory.
//
// Files saved by spreadsheets often start with a UTF-8 byte-order mark and end their lines with
// "\r\n": the mark is dropped and "\r\n" ends a line like "\n", so such a file reads exactly
// like the clean one. A line longer than kMaxLineBytes, or one holding a byte that no text file
// holds (NUL and other control characters except tab, malformed UTF-8), is an InputError naming
// the file, line and column: a binary file is refused at its first bad byte, not read whole.
#include <cstddef>
#include <istream>
#include <string>
#include <string_view>

namespace coilwright {

inline constexpr std::size_t kMaxLineBytes = 65536;

class LineReader {
 public:
  // Reads from a stream, a block at a time; `file` names it in messages.
  LineReader(std::istream& in, std::string file);
  // Reads from text held in memory (it must outlive the reader).
  LineReader(std::string_view text, std::string file);

  // The next line, without its line end; false at the end of the input. The view stays valid
  // until the next call.
  bool next(std::string_view& line);
  // The line last returned, counted from 1.
  [[nodiscard]] std::size_t line_number() const noexcept { return line_; }
  [[nodiscard]] const std::string& file() const noexcept { return file_; }

 private:
  bool fill();  // reads another block from the stream; false at its end
  void check(std::string_view line) const;

  std::istream* in_ = nullptr;
  std::string file_;
  std::string buffer_;     // stream mode: unread bytes start at pos_
  std::string_view text_;  // text mode: the whole input
  std::size_t pos_ = 0;
  std::size_t line_ = 0;
  bool at_end_ = false;
};

}  // namespace coilwright

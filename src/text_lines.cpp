#include "coilwright/text_lines.hpp"

#include <fmt/format.h>

#include "coilwright/error.hpp"

namespace coilwright {

namespace {

constexpr std::string_view kByteOrderMark = "\xEF\xBB\xBF";
constexpr std::size_t kBlockBytes = 1 << 16;

// Length of the UTF-8 sequence starting at s[i], or 0 if it is malformed (RFC 3629: no
// overlong forms, no surrogates, nothing above U+10FFFF).
std::size_t utf8_length(std::string_view s, std::size_t i) {
  const auto b = [&](std::size_t k) { return static_cast<unsigned char>(s[k]); };
  const unsigned char c = b(i);
  // The sequence length and the allowed range of its second byte, by lead byte (RFC 3629, 4).
  std::size_t n = 0;
  unsigned char lo = 0x80, hi = 0xBF;
  if (c >= 0xC2 && c <= 0xDF) {
    n = 2;
  } else if (c >= 0xE0 && c <= 0xEF) {
    n = 3;
    if (c == 0xE0) lo = 0xA0;  // no overlong forms
    if (c == 0xED) hi = 0x9F;  // no surrogates
  } else if (c >= 0xF0 && c <= 0xF4) {
    n = 4;
    if (c == 0xF0) lo = 0x90;  // no overlong forms
    if (c == 0xF4) hi = 0x8F;  // nothing above U+10FFFF
  } else {
    return 0;
  }
  if (i + n > s.size() || b(i + 1) < lo || b(i + 1) > hi) return 0;
  for (std::size_t k = 2; k < n; ++k)
    if (b(i + k) < 0x80 || b(i + k) > 0xBF) return 0;
  return n;
}

}  // namespace

LineReader::LineReader(std::istream& in, std::string file) : in_(&in), file_(std::move(file)) {}

LineReader::LineReader(std::string_view text, std::string file) : file_(std::move(file)), text_(text) {}

bool LineReader::fill() {
  if (at_end_) return false;
  buffer_.erase(0, pos_);
  pos_ = 0;
  const std::size_t old = buffer_.size();
  buffer_.resize(old + kBlockBytes);
  in_->read(buffer_.data() + old, static_cast<std::streamsize>(kBlockBytes));
  buffer_.resize(old + static_cast<std::size_t>(in_->gcount()));
  if (!*in_) at_end_ = true;
  return buffer_.size() > old;
}

bool LineReader::next(std::string_view& line) {
  std::string_view data = in_ ? std::string_view(buffer_) : text_;
  std::size_t eol = data.find('\n', pos_);
  while (in_ && eol == std::string_view::npos) {
    if (buffer_.size() - pos_ > kMaxLineBytes) break;
    const std::size_t searched = buffer_.size() - pos_;
    if (!fill()) break;
    data = buffer_;
    eol = data.find('\n', searched);
  }
  if (pos_ >= data.size()) return false;
  ++line_;
  const std::size_t end = eol == std::string_view::npos ? data.size() : eol;
  if (end - pos_ > kMaxLineBytes)
    throw InputError(SourceLocation{file_, line_, kMaxLineBytes + 1}, "",
                     fmt::format("the line is longer than {} bytes; accepted: a text file with shorter lines "
                                 "(is this file a CSV table?)", kMaxLineBytes));
  line = data.substr(pos_, end - pos_);
  pos_ = eol == std::string_view::npos ? data.size() : eol + 1;
  if (line_ == 1 && line.substr(0, kByteOrderMark.size()) == kByteOrderMark) line.remove_prefix(kByteOrderMark.size());
  if (!line.empty() && line.back() == '\r') line.remove_suffix(1);
  check(line);
  return true;
}

void LineReader::check(std::string_view line) const {
  for (std::size_t i = 0; i < line.size();) {
    const auto c = static_cast<unsigned char>(line[i]);
    if (c >= 0x20 && c < 0x7F) {
      ++i;
      continue;
    }
    if (c == '\t') {
      ++i;
      continue;
    }
    const SourceLocation at{file_, line_, i + 1};
    if (c == '\r')
      throw InputError(at, "", "found a carriage return inside the line; accepted: lines ended by \\n or \\r\\n");
    if (c < 0x80) throw InputError(at, "", fmt::format("found the control byte 0x{:02X}; accepted: a text file (is this file binary?)", c));
    const std::size_t n = utf8_length(line, i);
    if (n == 0)
      throw InputError(at, "", fmt::format("found the byte 0x{:02X}, which is not valid UTF-8; accepted: a text file in UTF-8 or ASCII", c));
    i += n;
  }
}

}  // namespace coilwright

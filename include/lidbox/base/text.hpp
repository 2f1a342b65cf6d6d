// Small text utilities shared by the readers: trimming, CSV fields, numbers, file reading, and
// the "did you mean" hint for misspelt names.
#pragma once

#include <string>
#include <string_view>
#include <vector>

namespace lidbox {

// Blanks (space, tab, CR, LF, VT, FF) removed at both ends; a view into `s`.
std::string_view trim(std::string_view s);
// ASCII lower case (names, units and attribute values are ASCII; other bytes pass unchanged).
std::string lower(std::string_view s);
// "a, b, c" (or with another separator).
std::string join(const std::vector<std::string>& items, std::string_view separator = ", ");
// Splits into lines, accepting \n and \r\n.
std::vector<std::string> split_lines(const std::string& text);
// One CSV row (RFC 4180): comma-separated, double quotes around fields that hold commas.
std::vector<std::string> split_csv_row(const std::string& line);
// The same, but a quote left open at the end of the line is an InputError at `where`: fields
// never span lines in the files lidbox reads.
std::vector<std::string> split_csv_row(const std::string& line, const std::string& where);
// `text` without a leading UTF-8 byte order mark (EF BB BF), which some spreadsheets write: every
// CSV reader accepts it alike.
std::string_view strip_utf8_bom(std::string_view text);
// Refuses text whose lines end in a carriage return alone (classic Mac OS), which would read as
// one long line: "<display_name>:1: lines end in a carriage return alone; expected lines ending
// in LF or CR LF".
void refuse_cr_only_lines(std::string_view text, const std::string& display_name);
// A hint for a header that is not comma-separated: " (the header holds semicolons: the
// separator must be a comma)", the same for tabs; "" otherwise.
std::string separator_hint(std::string_view header_line);
// File content quoted in a message: at most `max_chars` bytes (cut at a UTF-8 boundary, then
// "…"), NUL as \0 and other control bytes as \xNN, so that a 200 MB line or a binary file
// never floods a message or cuts it short.
std::string excerpt(std::string_view text, std::size_t max_chars = 80);
// Strict decimal parse of the whole text (no trailing characters, finite).
bool parse_double(std::string_view text, double& value);
// Whole file; InputError naming `display_name` when it cannot be read or is a folder
// ("<name>: the path is a folder; expected a file").
std::string read_text_file(const std::string& path, const std::string& display_name);
// `digits` significant digits, no trailing zeros; "" for NaN (a missing value in a table).
std::string format_number(double v, int digits = 7);
// Optimal-string-alignment distance: Levenshtein plus adjacent transpositions, so "levle" is one
// edit from "level" and "bhl" one from "blh".
std::size_t edit_distance(std::string_view a, std::string_view b);
// The closest candidate (case-insensitive), or empty when none is within max(1, size/3) edits.
std::string closest_name(std::string_view word, const std::vector<std::string>& candidates);
// " (did you mean \"x\"?)" for the closest_name, or "" when there is none.
std::string did_you_mean(std::string_view word, const std::vector<std::string>& choices);

}  // namespace lidbox

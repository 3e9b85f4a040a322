#pragma once

// The sizes the tool is built for, in one place. At each limit `analyze`, `export` (every format)
// and the window (opening a study, its analysis and its models) finish within 2 s and 1 GiB on a
// two-core machine (bench/BenchAnalysis and bench/BenchWindow hold the cases at the limits);
// beyond them input is refused with a message that names the field. The help texts, README and
// DEVELOPERS.md quote these numbers.

namespace cb {

// Levels of one factor.
inline constexpr int kMaxLevels = 200;
// Factors crossed in a design.
inline constexpr int kMaxDesignFactors = 3;
// Cells of a design (the product of its factors' level counts): the cell means are analysed
// as one factor with this many levels.
inline constexpr int kMaxCells = 200;
static_assert(kMaxCells <= kMaxLevels, "the cell means are analysed as one factor");

} // namespace cb

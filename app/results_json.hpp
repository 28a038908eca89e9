#pragma once
// The results of a solve as JSON, for scripts. The layout is documented
// field by field in docs/results-json.md and changes only together with
// `schema_version` and a changelog note. All values are SI (K, Pa, kg, J,
// s) unless the key says otherwise; amounts are per batch or per hour as
// `basis` and `amount_unit` state.

#include <nlohmann/json.hpp>

#include <string>
#include <vector>

#include "flowsheet/case.hpp"
#include "flowsheet/solver.hpp"

namespace unchain::app {

// Keys keep the order they are written in (streams in case order), which
// makes the file easy to read and diff.
using Json = nlohmann::ordered_json;

inline constexpr int results_schema_version = 1;

Json balance_to_json(const BalanceClosure& balance);
Json stream_to_json(const Case& c, std::size_t stream_index, const Stream& stream);
Json block_to_json(const BlockResult& block);

// The whole results document. `cautions` are the case's safety cautions as
// shown in the summary (see safety_notes.hpp).
Json results_to_json(const Case& c, const SolveResult& result, const std::vector<std::string>& cautions);

// The dotted paths of every NaN or infinity in a document ("streams.top.temperature_K").
std::vector<std::string> non_finite_json_fields(const Json& doc);
// Throws std::logic_error naming the first such field: results are checked
// before they are written (flowsheet/finite_check.hpp), so one reaching
// the writer is a bug (exit 1), never a "nan" or a silent null in the file.
void require_finite_json(const Json& doc);

}  // namespace unchain::app

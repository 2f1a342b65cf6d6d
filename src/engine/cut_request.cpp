#include "lidbox/engine/cut_request.hpp"

#include <cmath>

#include "lidbox/base/error.hpp"
#include "lidbox/base/text.hpp"
#include "lidbox/engine/emission_scenario.hpp"

namespace lidbox {

std::string describe(const CutTarget& t) {
  switch (t.kind) {
    case CutTargetKind::deterministic:
      return "the deterministic run";
    case CutTargetKind::member:
      return "member " + std::to_string(t.member);
    case CutTargetKind::percentile:
      return "the " + format_number(t.percentile, 4) + "th percentile of the members";
    case CutTargetKind::at_most_members:
      return "at most " + std::to_string(t.at_most_members) + " member" +
             (t.at_most_members == 1 ? "" : "s") + " exceeding";
  }
  return "";
}

namespace {

const char* kTargetExpected =
    "target = \"deterministic\", { member = 3 }, { percentile = 90 } or { at_most_members = 2 }";

CutTarget read_target(const TomlTable& r, bool has_ensemble) {
  CutTarget t;
  const toml::node* n = r.node("target");
  if (!n) return t;
  if (n->is_string()) {
    const std::string s = r.required_string("target");
    if (s != "deterministic") throw InputError(r.where("target"), "\"" + s + "\"", kTargetExpected);
    return t;
  }
  if (!n->is_table()) r.throw_wrong_type("target", kTargetExpected);
  const TomlTable tt = *r.optional_table("target", {"member", "percentile", "at_most_members"});
  const int keys = tt.has("member") + tt.has("percentile") + tt.has("at_most_members");
  if (keys != 1)
    throw InputError(tt.where_table(), std::to_string(keys) + " targets",
                     "exactly one: " + std::string(kTargetExpected));
  if (!has_ensemble) {
    throw InputError(r.where("target"), "an ensemble target without an [ensemble] table",
                     "target = \"deterministic\", or an [ensemble] table naming the members");
  }
  if (tt.has("member")) {
    t.kind = CutTargetKind::member;
    t.member = static_cast<std::size_t>(tt.required_whole_number("member", 1, 1000000));
  } else if (tt.has("percentile")) {
    t.kind = CutTargetKind::percentile;
    t.percentile = tt.required_number("percentile");
    if (t.percentile < 0.0 || t.percentile > 100.0) {
      throw InputError(tt.where("percentile"), format_number(t.percentile),
                       "a percentile from 0 to 100");
    }
  } else {
    t.kind = CutTargetKind::at_most_members;
    t.at_most_members = tt.required_whole_number("at_most_members", 0, 1000000);
  }
  return t;
}

}  // namespace

void check_cut_target(const CutRequest& cut, std::size_t n_members) {
  const CutTarget& t = cut.target;
  if (t.kind == CutTargetKind::member && t.member > n_members) {
    throw InputError(
        cut.target_where,
        "member " + std::to_string(t.member) + " of an ensemble of " + std::to_string(n_members),
        "a member from 1 to " + std::to_string(n_members));
  }
  if (t.kind == CutTargetKind::at_most_members &&
      t.at_most_members >= static_cast<int>(n_members)) {
    throw InputError(cut.target_where,
                     "at most " + std::to_string(t.at_most_members) + " of " +
                         std::to_string(n_members) + " members, which every scale meets",
                     "a count from 0 to " + std::to_string(n_members - 1));
  }
}

std::optional<CutRequest> read_cut_request(const TomlTable& top,
                                           const std::vector<std::string>& sector_names,
                                           const TimeZone& zone, bool has_ensemble,
                                           std::size_t ensemble_size) {
  const auto r = top.optional_table("cut", {"sectors", "start", "target"});
  if (!r) return std::nullopt;
  CutRequest cut;
  if (!top.has("standards")) {
    throw InputError(r->where_table(), "a [cut] without [standards]",
                     "a [standards] table naming the rule sets to cut to");
  }
  if (top.has("scenario")) {
    throw InputError(
        r->where_table(), "a [cut] beside a [scenario]",
        "one of them: the cut is computed on the case as it is; try it as a scenario after");
  }
  const std::vector<std::string> names = r->string_array("sectors");
  const std::string sectors_expected = "sectors = [\"<sector>\", ...], the sectors to cut";
  if (!r->has("sectors")) r->throw_missing("sectors", sectors_expected);
  if (names.empty()) throw InputError(r->where("sectors"), "an empty array", sectors_expected);
  cut.sectors = sector_indices(*r, "sectors", names, sector_names);
  cut.start_where = r->where("start");
  if (auto s = r->optional_string("start"))
    cut.start_utc = parse_iso8601(*s, &zone, cut.start_where);
  cut.target_where = r->where("target");
  cut.target = read_target(*r, has_ensemble);
  if (ensemble_size > 0) check_cut_target(cut, ensemble_size);
  return cut;
}

}  // namespace lidbox

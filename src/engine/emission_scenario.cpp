#include "lidbox/engine/emission_scenario.hpp"

#include "lidbox/base/error.hpp"
#include "lidbox/base/text.hpp"

namespace lidbox {

std::size_t hour_index_in_run(UtcSeconds start_utc, UtcSeconds first_hour_utc, std::size_t n_hours,
                              const std::string& where) {
  const UtcSeconds last = first_hour_utc + static_cast<UtcSeconds>(n_hours - 1) * kSecondsPerHour;
  const bool inside = start_utc >= first_hour_utc && start_utc <= last;
  if (n_hours == 0 || !inside || (start_utc - first_hour_utc) % kSecondsPerHour != 0) {
    throw InputError(
        where,
        format_utc(start_utc) + (inside ? ", not the start of an hour" : ", outside the run"),
        "the start of an hour from " + format_utc(first_hour_utc) + " to " + format_utc(last));
  }
  return static_cast<std::size_t>((start_utc - first_hour_utc) / kSecondsPerHour);
}

void apply_emission_scenario(const EmissionScenario& scenario, UtcSeconds first_hour_utc,
                             Forcing& forcing) {
  const std::size_t from =
      hour_index_in_run(scenario.start_utc, first_hour_utc, forcing.n_hours, scenario.where);
  for (std::size_t s = 0; s < forcing.n_sectors; ++s) {
    const double k = scenario.sector_scale.at(s);
    if (k == 1.0) continue;
    for (std::size_t i = from; i < forcing.n_hours; ++i) {
      forcing.clock(s, i, 0) *= k;
      forcing.clock(s, i, 1) *= k;
    }
  }
}

std::vector<std::size_t> sector_indices(const TomlTable& table, const std::string& key,
                                        const std::vector<std::string>& names,
                                        const std::vector<std::string>& sector_names) {
  std::vector<std::size_t> out;
  for (const auto& name : names) {
    std::size_t k = 0;
    while (k < sector_names.size() && sector_names[k] != name) ++k;
    if (k == sector_names.size()) {
      throw InputError(
          table.where(key), "no sector \"" + name + "\"" + did_you_mean(name, sector_names),
          "one of the case's sectors: " + (sector_names.empty() ? "none" : join(sector_names)));
    }
    for (std::size_t j : out) {
      if (j == k)
        throw InputError(table.where(key), "sector \"" + name + "\" named twice",
                         "each sector once");
    }
    out.push_back(k);
  }
  return out;
}

std::optional<EmissionScenario> read_emission_scenario(const TomlTable& top,
                                                       const std::vector<std::string>& sector_names,
                                                       const TimeZone& zone) {
  const auto r = top.optional_table("scenario", {"start", "scale"});
  if (!r) return std::nullopt;
  EmissionScenario s;
  s.where = r->where("start");
  s.start_utc = parse_iso8601(r->required_string("start"), &zone, s.where);
  const toml::node* n = r->node("scale");
  if (!n)
    r->throw_missing("scale",
                     "scale = { <sector> = <factor>, ... }, such as { home_heating = 0.8 }");
  if (!n->is_table()) r->throw_wrong_type("scale", "a table { <sector> = <factor>, ... }");
  std::vector<std::string> names;
  for (const auto& [k, v] : *n->as_table()) names.emplace_back(k.str());
  if (names.empty())
    throw InputError(r->where("scale"), "an empty table", "at least one sector with its factor");
  const TomlTable scales = *r->optional_table("scale", names);
  const auto idx = sector_indices(*r, "scale", names, sector_names);
  s.sector_scale.assign(sector_names.size(), 1.0);
  for (std::size_t k = 0; k < names.size(); ++k) {
    const double v = scales.required_number(names[k]);
    if (v < 0.0)
      throw InputError(scales.where(names[k]), format_number(v), "a factor >= 0 (1 = unchanged)");
    s.sector_scale[idx[k]] = v;
  }
  return s;
}

}  // namespace lidbox

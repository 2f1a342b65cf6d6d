// The caution every report carries. lidbox output can inform decisions about people's health; it
// is a screening estimate and never an official forecast or alert.
#pragma once

namespace lidbox {

inline constexpr const char* kScreeningCaution =
    "Screening estimate from a single well-mixed box model; not an official forecast, "
    "air-quality alert or compliance determination. Official forecasts and alerts, local "
    "regulations and licensed professional practice prevail.";

// What reports of measured series (monitor data summarised by `lidbox observe`) carry instead:
// the numbers are the monitor's, not a model's, and the verdicts still decide nothing officially.
inline constexpr const char* kMeasuredDataCaution =
    "Summary of measured data as given (no model); unvalidated data may differ from the "
    "official record. Not an official compliance determination or air-quality alert: official "
    "statistics and alerts, local regulations and licensed professional practice prevail.";

// The caution for a report of measured (true) or modelled (false) series.
inline const char* caution_for(bool measured_data) {
  return measured_data ? kMeasuredDataCaution : kScreeningCaution;
}

}  // namespace lidbox

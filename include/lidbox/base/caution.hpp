// The caution every report carries. lidbox output can inform decisions about people's health; it
// is a screening estimate and never an official forecast or alert.
#pragma once

namespace lidbox {

inline constexpr const char* kScreeningCaution =
    "Screening estimate from a single well-mixed box model; not an official forecast, "
    "air-quality alert or compliance determination. Official forecasts and alerts, local "
    "regulations and licensed professional practice prevail.";

}  // namespace lidbox

// The run's tables as CF-NetCDF timeSeries files (netcdf_writer.hpp), the NetCDF counterparts of
// hourly.csv, budget.csv and the daily statistics table, one station named after the case.
//
// hourly.nc  rows are the run's hours, time = start of the hour with time_bnds (the writer's
//            rule). Met used (after floors) as hour means with CF standard names where they exist
//            (atmosphere_boundary_layer_thickness, wind_speed, wind_from_direction); ventilation
//            coefficient, flushing time; residual-layer top at the end of the hour; the flags
//            met_filled, calm_floor_applied, lid_floor_applied (flag_values 0 1, "no yes");
//            substeps. Per pollutant P (name made a CF name): P (hour mean), P_end_of_hour,
//            P_residual_end_of_hour and P_part_<part> (background, initial, each sector), in the
//            pollutant's reporting unit: mass concentrations as written ("ug m-3"), mixing ratios
//            as CF numbers ("1e-6" for ppm, "1e-9" for ppb, "1e-12" for ppt; the attribute
//            reporting_unit keeps "ppm"), with the standard name of the species when lidbox
//            knows it (mass_concentration_of_... / mole_fraction_of_..._in_air, the current PM
//            names) and the reference conditions of the conversion as an attribute.
// budget.nc  rows are the run's hours; per pollutant P the budget lines as rates over the
//            footprint in g h-1 (P_emitted, P_advected_in, ...), the layer masses at the end of
//            the hour in g and the cumulative closure in g, as budget.csv.
// rolling_<k>h.nc  the running means asked for in [standards] rolling.
// daily.nc   the daily statistics of the run's standards report (LST days, daily_cf_table()):
//            one variable per pollutant and statistic, P_daily_mean, P_daily_max_1h,
//            P_daily_max_8h_17_windows, ..., with the valid counts and completeness flags.
// Global attributes: case_name, case_title, case_file, time_zone, invented (and an INVENTED
// comment when the case says so), plus the writer's own (caution, version, ...).
#pragma once

#include <string>
#include <vector>

#include "lidbox/base/atomic_file.hpp"
#include "lidbox/base/output_folder.hpp"
#include "lidbox/engine/case_file.hpp"
#include "lidbox/engine/run.hpp"
#include "lidbox/report/netcdf_writer.hpp"
#include "lidbox/standards/standards_report.hpp"

namespace lidbox {

CfTable hourly_cf_table(const CaseSpec& c, const RunResult& r);
CfTable budget_cf_table(const CaseSpec& c, const RunResult& r);
// budget.nc hour by hour (a run that streams its budget): the table without values, and one
// hour's values in the order of its variables (per pollutant: the lines, the two masses, the
// cumulative closure, whose value per pollutant [g m-2] the caller gives).
CfTable budget_cf_layout(const CaseSpec& c, const RunResult& r);
std::size_t budget_values_per_hour(const RunResult& r);
void budget_hour_values(const CaseSpec& c, const RunResult& r, std::size_t hour,
                        const double* closure_g_m2, double* out);

// InternalError when the report has no daily rows.
CfTable daily_statistics_cf_table(const CaseSpec& c, const StandardsReport& report);

// The running means the case asked for ([standards] rolling), one table per request (window
// length k, at least m hours present), in the order of report.options.rolling: rows are the
// windows (time = window start, time_bnds = the window), per pollutant P P_mean_<k>h_min<m>
// and P_valid_hours_<k>h. Written as rolling_<k>h_min<m>.nc.
std::vector<CfTable> running_means_cf_tables(const CaseSpec& c, const StandardsReport& report);

// {"hourly.nc", "budget.nc"} (budget.nc only when the run kept its budget), with a report that has
// daily rows "daily.nc", and one "rolling_<k>h.nc" per requested window, rendered in memory (a run
// writes them with write_run_netcdf_outputs).
std::vector<OutputFile> render_run_netcdf_outputs(
    const CaseSpec& c, const RunResult& r, const StandardsReport* standards = nullptr,
    CfFileFormat format = CfFileFormat::netcdf4_classic);
// The same files written straight into a folder that is published as a whole, one table in
// memory at a time.
void write_run_netcdf_outputs(OutputFolder& folder, const CaseSpec& c, const RunResult& r,
                              const StandardsReport* standards,
                              CfFileFormat format = CfFileFormat::netcdf4_classic);

// The CF standard name of a pollutant's concentration in its reporting unit, "" when lidbox
// does not know the species. Names are matched loosely: "PM2.5", "PM25", "pm2p5"; "CO"; "NO2";
// "O3"; "SO2"; "PM10".
std::string pollutant_standard_name(const std::string& pollutant, bool mixing_ratio);

}  // namespace lidbox

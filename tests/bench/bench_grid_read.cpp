// Benchmark (not a test): the floor of any grid run on a file, a plain NetCDF-C read of the grid
// benchmark's variables (blh, u10, v10) in their stored type, a day of maps at a time, with no
// unpacking and no stepping: decompression and copying only. grid.sh times this whole process
// beside `lidbox grid` and the numpy references.
// Usage: bench_grid_read <grid.nc>
#include <netcdf.h>

#include <cstdio>
#include <vector>

namespace {
bool ok(int status, const char* what) {
  if (status == NC_NOERR) return true;
  std::fprintf(stderr, "bench_grid_read: %s: %s\n", what, nc_strerror(status));
  return false;
}
}  // namespace

int main(int argc, char** argv) {
  if (argc != 2) {
    std::fprintf(stderr, "usage: bench_grid_read <grid.nc>\n");
    return 2;
  }
  int id = -1;
  if (!ok(nc_open(argv[1], NC_NOWRITE, &id), argv[1])) return 2;
  const char* names[3] = {"blh", "u10", "v10"};
  int vars[3];
  std::size_t len[3] = {0, 0, 0};
  for (int k = 0; k < 3; ++k) {
    if (!ok(nc_inq_varid(id, names[k], &vars[k]), names[k])) return 2;
  }
  int dims[3];
  if (!ok(nc_inq_vardimid(id, vars[0], dims), "blh dimensions")) return 2;
  for (int d = 0; d < 3; ++d) {
    if (!ok(nc_inq_dimlen(id, dims[d], &len[d]), "dimension length")) return 2;
  }
  std::vector<short> buffer(24 * len[1] * len[2]);
  long long sum = 0;
  for (std::size_t t0 = 0; t0 < len[0]; t0 += 24) {
    const std::size_t start[3] = {t0, 0, 0};
    const std::size_t count[3] = {t0 + 24 <= len[0] ? 24 : len[0] - t0, len[1], len[2]};
    for (int k = 0; k < 3; ++k) {
      if (!ok(nc_get_vara_short(id, vars[k], start, count, buffer.data()), names[k])) return 2;
      for (std::size_t i = 0; i < count[0] * len[1] * len[2]; ++i) sum += buffer[i];
    }
  }
  nc_close(id);
  std::printf("read %zu hours of %zu x %zu cells, checksum %lld\n", len[0], len[1], len[2], sum);
  return 0;
}

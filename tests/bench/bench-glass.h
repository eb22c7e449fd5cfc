/* What the benchmarks share: the generated glass and the measures. */
#ifndef GP_BENCH_GLASS_H
#define GP_BENCH_GLASS_H

#include <stdbool.h>

/* A dot-matrix glass of 320 x 240 dots of 5 x 8 dot cells, times scale in
 * pixel count; when routed, its segments go to a ledge at the bottom and
 * its commons to one on the right.  Returns malloc'd YAML (NULL when out of
 * memory) and the pixel count. */
char *bench_describe(double scale, bool routed, long *pixels);
/* Monotonic seconds. */
double bench_now(void);
/* Peak resident memory of the process so far, MB. */
double bench_peak_mb(void);

#endif

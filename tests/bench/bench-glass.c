#include "bench-glass.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <sys/resource.h>
#include <time.h>

char *bench_describe(double scale, bool routed, long *pixels)
{
	long cells = lround(64 * sqrt(scale)), lines = lround(30 * sqrt(scale));
	*pixels = cells * lines * 40;
	double width = cells * 3.2 + 20, height = lines * 5.6 + 20;
	char *text = malloc(4096);
	if (!text)
		return NULL;
	snprintf(text, 4096,
		 "glass: {part: BENCH-%ld}\n"
		 "front: {size: [%.1f, %.1f]}\n"
		 "back: {size: [%.1f, %.1f], position: [0, 5]}\n"
		 "viewing_area: {position: [5, 10], size: [%.1f, %.1f]}\n"
		 "blocks:\n"
		 "  matrix:\n"
		 "    origin: [10, %.1f]\n"
		 "    cells: [%ld, %ld]\n"
		 "    dots: [5, 8]\n"
		 "    dot_size: [0.5, 0.55]\n"
		 "    dot_pitch: [0.55, 0.6]\n"
		 "    cell_pitch: 3.2\n"
		 "    line_pitch: 5.6\n"
		 "%s",
		 *pixels, width, height + 5, width + 6, height, width - 10,
		 height - 10, height, cells, lines,
		 !routed ? "" :
		 "ledges:\n"
		 "  segments: {side: bottom, pitch: 0.64, pad_width: 0.32,"
		 " pad_length: 2, carries: segments}\n"
		 "  commons: {side: right, pitch: 0.7, pad_width: 0.35,"
		 " pad_length: 2, carries: commons}\n"
		 "seal: {width: 1, distance: 0.5}\n");
	return text;
}

double bench_now(void)
{
	struct timespec t;
	clock_gettime(CLOCK_MONOTONIC, &t);
	return (double)t.tv_sec + (double)t.tv_nsec / 1e9;
}

double bench_peak_mb(void)
{
	struct rusage usage;
	getrusage(RUSAGE_SELF, &usage);
	return (double)usage.ru_maxrss / 1024.0;
}

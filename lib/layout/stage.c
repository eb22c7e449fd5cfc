/* What every stage may do to the build besides its own results: ask
 * whether an output is wanted, record an input file, date the outputs,
 * offer a lead end. */
#include "stage.h"

#include "array.h"
#include "route-spec.h"

#include <stdlib.h>
#include <string.h>
#include <time.h>

bool gp_build_wants(const struct gp_build *build, enum gp_output_kind kind)
{
	return (build->outputs & (unsigned)kind) != 0;
}

bool gp_build_add_input(struct gp_build *build, const char *path)
{
	const char *list = build->inputs.data ? build->inputs.data : "";
	size_t length = strlen(path);
	for (const char *p = list; *p;) {
		const char *end = strchr(p, '\n');
		if ((size_t)(end - p) == length && strncmp(p, path, length) == 0)
			return true;
		p = end + 1;
	}
	return gp_buffer_printf(&build->inputs, "%s\n", path);
}

const char *gp_build_date(const struct gp_build *build, char *buffer,
			  size_t size)
{
	if (!build->has_epoch)
		return NULL;
	time_t t = (time_t)build->epoch;
	struct tm tm;
	if (!gmtime_r(&t, &tm) || strftime(buffer, size, "%Y-%m-%d", &tm) == 0)
		return NULL;
	return buffer;
}

bool gp_build_add_lead_end(struct gp_build *build, int net,
			   enum gp_side side, struct gp_point at,
			   int64_t width)
{
	if (!gp_array_reserve(build->ends, build->end_capacity, build->end_count + 1))
		return false;
	build->ends[build->end_count++] = (struct gp_lead_end){
		.net = net, .side = side, .at = at, .width = width,
	};
	return true;
}

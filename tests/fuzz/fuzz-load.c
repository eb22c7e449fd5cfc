/* libFuzzer harness: the description loader (YAML, overrides, every
 * section reader) on in-memory input. */
#include "fuzz-common.h"

#include "glassplot.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
	struct fuzz_input input;
	struct gp_diag diag;
	if (!fuzz_input_init(&input, data, size))
		goto out;
	gp_diag_init(&diag);
	struct gp_design *design = gp_design_load_buffer(
		"fuzz.yaml", input.body, input.body_size,
		(const char *const *)input.overrides, input.override_count,
		&diag);
	fuzz_check_diag(&diag, design != NULL);
	gp_design_destroy(design);
	gp_diag_finish(&diag);
out:
	fuzz_input_finish(&input);
	return 0;
}

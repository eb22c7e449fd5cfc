#include "tool.h"

int cmd_check(const struct tool_options *options)
{
	struct gp_diag *diag = gp_diag_create();
	if (!diag)
		return tool_usage_error("out of memory");
	tool_progress("loading", (void *)options);
	struct gp_design *design =
		tool_load(options, NULL, options->overrides,
			  options->override_count, diag);
	struct gp_build *build =
		design ? gp_build_create_with_progress(
				 design, tool_progress, (void *)options, diag)
		       : NULL;
	int status = EXIT_BAD_INPUT;
	if (build) {
		status = gp_build_check_status(build, options->strict)
				 ? EXIT_FINDINGS
				 : EXIT_OK;
		tool_progress(NULL, (void *)options);
		if (options->json)
			fputs(gp_build_check_json(build), stdout);
		else if (options->verbosity >= 0 || status != EXIT_OK)
			tool_put(gp_build_check_text(build), stdout);
	}
	if (design)
		tool_print_diag(diag, options->verbosity);
	gp_build_destroy(build);
	gp_design_destroy(design);
	gp_diag_destroy(diag);
	return status;
}

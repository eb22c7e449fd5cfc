#include "tool.h"

#include <stdio.h>

int cmd_preview(const struct tool_options *options)
{
	struct gp_diag *diag = gp_diag_create();
	if (!diag)
		return tool_usage_error("out of memory");
	struct gp_design *design =
		tool_load(options, NULL, options->overrides,
			  options->override_count, diag);
	struct gp_build *build = design ? gp_build_create(design, diag) : NULL;
	bool ok = build && gp_build_show(build, options->show, diag) &&
		  gp_build_write_preview(build, options->output,
					 options->dpi > 0 ? options->dpi : 300,
					 diag);
	if (ok && options->verbosity >= 0)
		printf("wrote: %s\n", options->output);
	if (design)
		tool_print_diag(diag, options->verbosity);
	gp_build_destroy(build);
	gp_design_destroy(design);
	gp_diag_destroy(diag);
	return ok ? EXIT_OK : EXIT_BAD_INPUT;
}

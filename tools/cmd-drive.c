#include "tool.h"

#include <stdlib.h>

int cmd_drive(const struct tool_options *options)
{
	struct gp_diag *diag = gp_diag_create();
	if (!diag)
		return tool_usage_error("out of memory");
	int status = EXIT_BAD_INPUT;
	struct gp_design *design =
		tool_load(options, NULL, options->overrides,
			  options->override_count, diag);
	bool feasible = false;
	char *text = design ? gp_drive_report_create(
				      design,
				      options->json ? GP_DRIVE_JSON
						    : GP_DRIVE_TEXT,
				      &feasible, diag)
			    : NULL;
	if (text) {
		if (options->json)
			fputs(text, stdout);
		else
			tool_put(text, stdout);
		fflush(stdout);
		status = feasible ? EXIT_OK : EXIT_FINDINGS;
	}
	if (design)
		tool_print_diag(diag, options->verbosity);
	free(text);
	gp_design_destroy(design);
	gp_diag_destroy(diag);
	return status;
}

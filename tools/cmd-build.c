#include "tool.h"

int cmd_build(const struct tool_options *options)
{
	long long epoch = 0;
	int has_epoch = tool_source_date_epoch(&epoch);
	if (has_epoch < 0)
		return EXIT_BAD_INPUT;
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
		if (has_epoch)
			gp_build_set_epoch(build, epoch);
		gp_build_set_depfile(build, options->depfile);
	}
	if (build && options->show && !gp_build_show(build, options->show, diag)) {
		gp_build_destroy(build);
		build = NULL;
	}
	if (build && options->faces &&
	    !gp_build_set_faces(build, options->faces, diag)) {
		gp_build_destroy(build);
		build = NULL;
	}
	if (build && (!options->only ||
		      gp_build_select(build, options->only, diag)) &&
	    gp_build_write(build, options->output, diag)) {
		/* the artwork is written either way; findings that block
		 * manufacture (see report.txt) make the status 1 */
		status = gp_build_check_status(build, options->strict)
				 ? EXIT_FINDINGS
				 : EXIT_OK;
		tool_progress(NULL, (void *)options);
		if (options->json)
			fputs(gp_build_summary_json(build), stdout);
		else if (options->verbosity >= 0)
			tool_put(gp_build_summary(build), stdout);
	}
	if (design)
		tool_print_diag(diag, options->verbosity);
	gp_build_destroy(build);
	gp_design_destroy(design);
	gp_diag_destroy(diag);
	return status;
}

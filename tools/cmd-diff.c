#include "tool.h"

static struct gp_build *load_build(const char *path, const char *const *overrides,
				   size_t count, struct gp_design **design,
				   struct gp_diag *diag)
{
	*design = gp_design_load(path, overrides, count, diag);
	return *design ? gp_build_create(*design, diag) : NULL;
}

int cmd_diff(const struct tool_options *o)
{
	struct gp_diag *diag = gp_diag_create();
	if (!diag)
		return tool_usage_error("out of memory");
	int status = EXIT_BAD_INPUT;
	const char *new_path = o->second ? o->second : o->description;
	struct gp_design *old_design = NULL, *new_design = NULL;
	struct gp_build *old_build =
		load_build(o->description, NULL, 0, &old_design, diag);
	struct gp_build *new_build =
		old_build ? load_build(new_path, o->overrides,
				       o->override_count, &new_design, diag)
			  : NULL;
	struct gp_diff *diff =
		new_build ? gp_diff_create(old_build, new_build, diag) : NULL;
	if (diff && (!o->pdf || gp_diff_write_pdf(diff, o->pdf, diag))) {
		if (o->verbosity >= 0)
			tool_put(gp_diff_text(diff), stdout);
		status = gp_diff_identical(diff) ? EXIT_OK : EXIT_FINDINGS;
	}
	tool_print_diag(diag, o->verbosity);
	gp_diff_destroy(diff);
	gp_build_destroy(new_build);
	gp_build_destroy(old_build);
	gp_design_destroy(new_design);
	gp_design_destroy(old_design);
	gp_diag_destroy(diag);
	return status;
}

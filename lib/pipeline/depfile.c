/* The make/ninja dependency file of a build: every output depends on the
 * description and on every font read. */
#include "build.h"
#include "staged-file.h"

#include <string.h>

/* Make syntax: spaces, '#' and '\' escaped with a backslash, '$' doubled. */
static void put_make_name(struct gp_buffer *out, const char *name,
			  size_t length)
{
	for (size_t i = 0; i < length; i++) {
		char c = name[i];
		if (c == ' ' || c == '#' || c == '\\')
			gp_buffer_append(out, "\\", 1);
		else if (c == '$')
			gp_buffer_append(out, "$", 1);
		gp_buffer_append(out, &c, 1);
	}
}

/* "FOLDER/a FOLDER/b: DESCRIPTION \
 *   FONT..." */
static void depfile_text(const struct gp_build *build,
			 const struct gp_output_set *set, const char *folder,
			 struct gp_buffer *out)
{
	for (size_t i = 0; i < set->count; i++) {
		put_make_name(out, folder, strlen(folder));
		gp_buffer_append(out, "/", 1);
		put_make_name(out, set->files[i].name,
			      strlen(set->files[i].name));
		gp_buffer_puts(out, i + 1 < set->count ? " " : ": ");
	}
	const char *description =
		build->design->spec ? build->design->spec->file : "";
	put_make_name(out, description, strlen(description));
	const char *inputs = build->inputs.data ? build->inputs.data : "";
	for (const char *p = inputs; *p;) {
		size_t length = strcspn(p, "\n");
		gp_buffer_puts(out, " \\\n  ");
		put_make_name(out, p, length);
		p += length + (p[length] == '\n');
	}
	gp_buffer_puts(out, "\n");
}

bool gp_depfile_stage(const struct gp_build *build,
		      const struct gp_output_set *set, const char *folder,
		      struct gp_staged_file *file, struct gp_diag *diag)
{
	struct gp_buffer text;
	gp_buffer_init(&text);
	depfile_text(build, set, folder, &text);
	bool ok = text.failed
			  ? gp_diag_oom(diag, NULL)
			  : gp_staged_file_write(file, build->depfile,
						 text.data, text.size, diag);
	gp_buffer_finish(&text);
	return ok;
}

/* Lists what the manuals must document, for tests/check-manuals.py:
 *
 *   command NAME                 every command of the tool
 *   option NAME SHORT LONG ARG   each option a command takes, from the
 *                                tool's own table ("-" when none)
 *   key SECTION KEY              every key the description's readers
 *                                accept, by top-level section ("-" for
 *                                the top level itself)
 *   output FILE                  every file a build of the samples writes
 *
 * Keys are found by loading every description in the folders given (with
 * the "#set KEY=VALUE" lines a fuzz input starts with applied as
 * overrides) while gp_reader_observe reports each map read with every key
 * its reader asked for, present or not: the readers themselves are the
 * list, so a key cannot be read and stay unlisted once any description
 * reaches its reader.  Outputs come from building the descriptions given
 * after --build in memory.
 * usage: list-keys DIR... [--build FILE...] */
#include "build.h"
#include "model.h"
#include "spec.h"
#include "tool.h"

#include <dirent.h>
#include <glib.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* Every node of the spec to the name of the top-level section it is in. */
static void map_nodes(GHashTable *sections, const struct gp_node *node,
		      const char *section)
{
	g_hash_table_insert(sections, (gpointer)node, (gpointer)section);
	for (size_t i = 0; node->kind != GP_NODE_SCALAR && i < node->count; i++)
		map_nodes(sections, node->items[i], section);
}

struct observed {
	GHashTable *sections;   /* node -> section */
	GHashTable *keys;       /* "SECTION KEY" set */
};

static void observe(const struct gp_reader *reader, void *data)
{
	struct observed *o = data;
	const char *section = g_hash_table_lookup(o->sections, reader->map);
	if (!section)
		return;
	for (size_t i = 0; i < reader->known_count; i++)
		g_hash_table_add(o->keys, g_strdup_printf("key %s %s", section,
							  reader->known[i]));
}

/* Applies the leading "#set KEY=VALUE" lines of a fuzz input. */
static void apply_set_lines(struct gp_spec *spec, const char *path,
			    struct gp_diag *diag)
{
	FILE *file = fopen(path, "r");
	char line[2048];
	for (int n = 1; file && fgets(line, sizeof(line), file) &&
			strncmp(line, "#set ", 5) == 0;
	     n++) {
		line[strcspn(line, "\r\n")] = '\0';
		gp_spec_override(spec, line + 5, n, diag);
	}
	if (file)
		fclose(file);
}

static void load(const char *path, struct observed *o)
{
	struct gp_diag diag;
	gp_diag_init(&diag);
	struct gp_spec *spec = gp_spec_load_file(path, &diag);
	if (spec) {
		apply_set_lines(spec, path, &diag);
		const struct gp_node *root = spec->root;
		g_hash_table_remove_all(o->sections);
		g_hash_table_insert(o->sections, (gpointer)root, "-");
		for (size_t i = 0; i < root->count; i++)
			map_nodes(o->sections, root->items[i],
				  root->keys[i]->text);
		gp_design_destroy(gp_design_from_spec(spec, &diag));
	}
	gp_diag_finish(&diag);
}

static void load_folder(const char *folder, struct observed *o)
{
	DIR *dir = opendir(folder);
	if (!dir) {
		fprintf(stderr, "list-keys: cannot read %s\n", folder);
		exit(2);
	}
	struct dirent *entry;
	while ((entry = readdir(dir))) {
		/* fuzz inputs have no extension; skip only what is not ours */
		const char *dot = strrchr(entry->d_name, '.');
		if (entry->d_name[0] == '.' ||
		    (dot && strcmp(dot, ".yaml") != 0))
			continue;
		char *path = g_build_filename(folder, entry->d_name, NULL);
		load(path, o);
		g_free(path);
	}
	closedir(dir);
}

static void list_outputs(const char *path, GHashTable *lines)
{
	struct gp_diag diag;
	gp_diag_init(&diag);
	struct gp_design *design = gp_design_load(path, NULL, 0, &diag);
	struct gp_build *build = design ? gp_build_create(design, &diag) : NULL;
	struct gp_output_set set;
	gp_output_set_init(&set);
	if (!build || !gp_build_outputs(build, &set, &diag)) {
		fprintf(stderr, "list-keys: cannot build %s\n", path);
		exit(2);
	}
	for (size_t i = 0; i < set.count; i++)
		g_hash_table_add(lines, g_strdup_printf("output %s",
							 set.files[i].name));
	gp_output_set_finish(&set);
	gp_build_destroy(build);
	gp_design_destroy(design);
	gp_diag_finish(&diag);
}

static void list_options(GHashTable *lines)
{
	for (size_t i = 0; i < tool_command_count; i++) {
		const struct tool_command *c = &tool_commands[i];
		g_hash_table_add(lines, g_strdup_printf("command %s", c->name));
		for (const struct tool_option *o = c->options; o->long_name;
		     o++)
			g_hash_table_add(
				lines,
				g_strdup_printf("option %s %s%c --%s %s",
						c->name,
						o->short_name ? "-" : "",
						o->short_name ? o->short_name
							      : '-',
						o->long_name,
						o->argument ? o->argument
							    : "-"));
	}
}

static gint compare(gconstpointer a, gconstpointer b)
{
	return strcmp(a, b);
}

int main(int argc, char **argv)
{
	struct observed o = {
		g_hash_table_new(g_direct_hash, g_direct_equal),
		g_hash_table_new_full(g_str_hash, g_str_equal, g_free, NULL),
	};
	gp_reader_observe(observe, &o);
	int i = 1;
	for (; i < argc && strcmp(argv[i], "--build") != 0; i++)
		load_folder(argv[i], &o);
	gp_reader_observe(NULL, NULL);
	for (i++; i < argc; i++)
		list_outputs(argv[i], o.keys);
	list_options(o.keys);
	GList *lines = g_list_sort(g_hash_table_get_keys(o.keys), compare);
	for (GList *l = lines; l; l = l->next)
		puts(l->data);
	g_list_free(lines);
	g_hash_table_destroy(o.keys);
	g_hash_table_destroy(o.sections);
	return 0;
}

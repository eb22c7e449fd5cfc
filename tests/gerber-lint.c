/* Reads Gerber files with the project's strict reader (gerber-read.h) and
 * prints the first violation of each; exit 1 when any file breaks a rule.
 * Besides the syntax, what glassplot promises of its attributes (Gerber
 * Layer Format Specification 2024.05, 5.6): .MD5 in every file; every
 * object with an .AperFunction; on the ITO layers every object with .N
 * (5.6.13: "It is recommended to attach a .N attribute to all copper
 * objects"), every ConnectorPad flashed with .P (5.6.14); outline files
 * "Profile,NP" (5.6.3) drawn with Profile apertures.
 * usage: gerber-lint FILE... */
#include "gerber-read.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

static char *slurp(const char *path, size_t *size)
{
	FILE *f = fopen(path, "rb");
	if (!f)
		return NULL;
	size_t capacity = 1 << 16, used = 0;
	char *text = malloc(capacity);
	while (text) {
		used += fread(text + used, 1, capacity - used, f);
		if (used < capacity)
			break;
		capacity *= 2;
		char *grown = realloc(text, capacity);
		if (!grown)
			free(text);
		text = grown;
	}
	bool failed = ferror(f);
	fclose(f);
	if (failed) {
		free(text);
		return NULL;
	}
	*size = used;
	return text;
}

static bool attributes_kept(const struct gr_file *f, char *why, size_t size)
{
	const char *function = gr_attribute(f, ".FileFunction");
	if (!function)
		return snprintf(why, size, "no .FileFunction") < 0;
	if (!f->has_md5)
		return snprintf(why, size, "no .MD5 (5.6.9)") < 0;
	bool ito = strncmp(function, "Other,", 6) == 0 &&
		   strstr(function, "-ito") != NULL;
	bool profile = strcmp(function, "Profile,NP") == 0;
	for (size_t i = 0; i < f->object_count; i++) {
		const struct gr_object *o = &f->objects[i];
		if (!o->function[0])
			return snprintf(why, size, "object at line %d has no "
					"AperFunction", o->line) < 0;
		if (profile && strcmp(o->function, "Profile") != 0)
			return snprintf(why, size, "object at line %d of a "
					"profile is %s", o->line,
					o->function) < 0;
		if (ito && !o->has_net)
			return snprintf(why, size, "object at line %d has no "
					".N", o->line) < 0;
		if (ito && strcmp(o->function, "ConnectorPad") == 0 &&
		    (o->kind != GR_FLASH || !o->pin[0]))
			return snprintf(why, size, "pad at line %d is not a "
					"flash with .P", o->line) < 0;
	}
	return true;
}

/* The header says which side the file is drawn from: a G04 comment
 * before the first command (4.1) and, but for a profile (whose
 * .FileFunction has no free field, 5.6.3), the .FileFunction text. */
static bool side_stated(const struct gr_file *f, const char *text, char *why,
			size_t size)
{
	const char *format = strstr(text, "%FS");
	const char *side = strstr(text, "\nG04 Seen from the ");
	if (!format || !side || side > format)
		return snprintf(why, size, "no G04 comment in the header "
				"saying which side it is seen from") < 0;
	const char *function = gr_attribute(f, ".FileFunction");
	if (strcmp(function, "Profile,NP") != 0 &&
	    !strstr(function, " seen from the "))
		return snprintf(why, size, ".FileFunction '%s' does not say "
				"which side it is seen from", function) < 0;
	return true;
}

int main(int argc, char **argv)
{
	int bad = 0;
	for (int i = 1; i < argc; i++) {
		size_t size = 0;
		char *text = slurp(argv[i], &size);
		if (!text) {
			printf("%s: cannot read\n", argv[i]);
			bad++;
			continue;
		}
		struct gr_file file;
		char why[256];
		if (!gr_read(text, size, &file)) {
			printf("%s: %s\n", argv[i], file.error);
			bad++;
		} else if (!attributes_kept(&file, why, sizeof(why)) ||
			   !side_stated(&file, text, why, sizeof(why))) {
			printf("%s: %s\n", argv[i], why);
			bad++;
		}
		gr_file_finish(&file);
		free(text);
	}
	return bad ? 1 : 0;
}

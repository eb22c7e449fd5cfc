/* Reads Gerber files with the project's strict reader (gerber-read.h) and
 * prints the first violation of each; exit 1 when any file breaks a rule.
 * usage: gerber-lint FILE... */
#include "gerber-read.h"

#include <stdio.h>
#include <stdlib.h>

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
		if (!gr_read(text, size, &file)) {
			printf("%s: %s\n", argv[i], file.error);
			bad++;
		}
		gr_file_finish(&file);
		free(text);
	}
	return bad ? 1 : 0;
}

/* Runs a fuzz harness over files and folders of inputs without libFuzzer,
 * so that the corpus (seeds and every past finding) is a regression test
 * in every build, with or without clang.
 * usage: replay-HARNESS FILE|FOLDER... */
#include "fuzz-common.h"

#include <dirent.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>

static int run_file(const char *path)
{
	FILE *file = fopen(path, "rb");
	if (!file) {
		perror(path);
		return 1;
	}
	size_t capacity = 1 << 16, size = 0;
	char *data = malloc(capacity);
	while (data) {
		size += fread(data + size, 1, capacity - size, file);
		if (size < capacity)
			break;
		char *grown = realloc(data, capacity *= 2);
		if (!grown)
			free(data);
		data = grown;
	}
	bool failed = !data || ferror(file);
	fclose(file);
	if (failed) {
		fprintf(stderr, "%s: cannot read\n", path);
		free(data);
		return 1;
	}
	LLVMFuzzerTestOneInput((const uint8_t *)data, size);
	free(data);
	return 0;
}

static int compare(const void *a, const void *b)
{
	return strcmp(*(char *const *)a, *(char *const *)b);
}

/* Every regular file of folder, in name order (reproducible runs). */
static int run_folder(const char *folder, size_t *count)
{
	DIR *dir = opendir(folder);
	if (!dir) {
		perror(folder);
		return 1;
	}
	char **names = NULL;
	size_t n = 0;
	int status = 0;
	for (struct dirent *e; (e = readdir(dir));) {
		if (e->d_name[0] == '.')
			continue;
		char **grown = realloc(names, (n + 1) * sizeof(*names));
		if (!grown || !(grown[n] = strdup(e->d_name))) {
			names = grown ? grown : names;
			status = 1;
			break;
		}
		names = grown;
		n++;
	}
	closedir(dir);
	if (n)
		qsort(names, n, sizeof(*names), compare);
	for (size_t i = 0; i < n; i++) {
		char path[4096];
		snprintf(path, sizeof(path), "%s/%s", folder, names[i]);
		struct stat st;
		if (!status && stat(path, &st) == 0 && S_ISREG(st.st_mode)) {
			status = run_file(path);
			(*count)++;
		}
		free(names[i]);
	}
	free(names);
	return status;
}

int main(int argc, char **argv)
{
	size_t count = 0;
	for (int i = 1; i < argc; i++) {
		struct stat st;
		if (stat(argv[i], &st) != 0) {
			perror(argv[i]);
			return 1;
		}
		int status = S_ISDIR(st.st_mode) ? run_folder(argv[i], &count)
						 : (count++, run_file(argv[i]));
		if (status)
			return status;
	}
	printf("%zu inputs ran without a finding\n", count);
	return count > 0 ? 0 : 1;
}

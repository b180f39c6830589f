/* replay.c: runs a fuzz harness (fuzz_*.c, linked in) once on every file named on the
 * command line or found in the folders named there, without libFuzzer: the regression
 * inputs of tests/fuzz/regress-* and the seed corpora replayed by `make check` (and
 * under the sanitizers by `make sanitize`). A harness that crashes or aborts stops the
 * program abnormally, so a broken input makes the suite fail; the name of the input is
 * printed first. */
#include "fuzz_common.h"

#include <dirent.h>
#include <sys/stat.h>

static int cmp_names(const void *a, const void *b)
{
    return strcmp(*(char *const *)a, *(char *const *)b);
}

static int replay_file(const char *path)
{
    FILE *f = fopen(path, "rb");
    if (!f) { fprintf(stderr, "replay: cannot read %s\n", path); return 1; }
    size_t cap = 4096, n = 0;
    unsigned char *buf = malloc(cap);
    for (;;) {
        if (!buf) { fprintf(stderr, "replay: out of memory\n"); fclose(f); return 1; }
        n += fread(buf + n, 1, cap - n, f);
        if (n < cap) break;
        unsigned char *nb = realloc(buf, cap *= 2);
        if (!nb) free(buf);
        buf = nb;
    }
    int err = ferror(f);
    fclose(f);
    if (err) { fprintf(stderr, "replay: cannot read %s\n", path); free(buf); return 1; }
    fprintf(stderr, "replay: %s\n", path);
    /* an exact-size copy, so that a read past the end is caught */
    unsigned char *copy = malloc(n ? n : 1);
    if (!copy) { free(buf); return 1; }
    memcpy(copy, buf, n);
    free(buf);
    LLVMFuzzerTestOneInput(copy, n);
    free(copy);
    return 0;
}

int main(int argc, char **argv)
{
    int bad = 0, count = 0;
    for (int i = 1; i < argc; i++) {
        struct stat st;
        if (stat(argv[i], &st) != 0) { fprintf(stderr, "replay: no %s\n", argv[i]); bad = 1; continue; }
        if (!S_ISDIR(st.st_mode)) { bad |= replay_file(argv[i]); count++; continue; }
        DIR *d = opendir(argv[i]);
        if (!d) { fprintf(stderr, "replay: cannot open %s\n", argv[i]); bad = 1; continue; }
        char **names = NULL;
        size_t nn = 0;
        for (struct dirent *e; (e = readdir(d));) {
            if (e->d_name[0] == '.') continue;
            char **nb = realloc(names, (nn + 1) * sizeof *names);
            size_t len = strlen(argv[i]) + strlen(e->d_name) + 2;
            char *p = malloc(len);
            if (!nb || !p) { fprintf(stderr, "replay: out of memory\n"); return 2; }
            names = nb;
            snprintf(p, len, "%s/%s", argv[i], e->d_name);
            names[nn++] = p;
        }
        closedir(d);
        qsort(names, nn, sizeof *names, cmp_names);
        for (size_t k = 0; k < nn; k++) { bad |= replay_file(names[k]); count++; free(names[k]); }
        free(names);
    }
    printf("replayed %d input%s\n", count, count == 1 ? "" : "s");
    return bad;
}

/* fuzz_run.c: libFuzzer harness (c): the whole of `avow run` (avow_run, the library
 * call the command makes) on a study and a data file cut from one input at the first
 * FUZZ_SEPARATOR: the bytes before it are the study, the bytes after it the data file
 * (given as --data). The input's length picks the report's format (its remainder by 3:
 * text, JSON, or HTML with the SVG pictures drawn). Besides
 * crashes, leaks, hangs and undefined behaviour it stops when the exit status and the
 * output disagree (a report exactly when the status is 0; a reason on standard error
 * whenever it is not), when the messages or the report are not valid UTF-8, or when the
 * JSON report is not JSON. */
#include "fuzz_common.h"

#include "avow/run.h"

#define FUZZ_SEPARATOR "\n@@data@@\n"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    const char *in = (const char *)data, *sep = NULL;
    size_t seplen = strlen(FUZZ_SEPARATOR);
    for (size_t i = 0; i + seplen <= size && !sep; i++)
        if (memcmp(in + i, FUZZ_SEPARATOR, seplen) == 0) sep = in + i;
    size_t study_len = sep ? (size_t)(sep - in) : size;
    const uint8_t *csv = sep ? data + study_len + seplen : data + size;
    const char *path = fuzz_file(csv, (size_t)(data + size - csv));

    avow_run_opts o = {.study_path = "fuzz/study.avow", .study_bytes = study_len ? in : "",
                       .study_len = study_len, .data_path = path, .json = size % 3 == 1,
                       .html = size % 3 == 2, .pictures = size % 3 == 2};
    avow_run_result r;
    int rc = avow_run(&o, &r);
    FUZZ_REQUIRE(rc == r.status, "the status returned and the status recorded differ");
    FUZZ_REQUIRE(rc == AVOW_EXIT_OK || rc == AVOW_EXIT_STUDY || rc == AVOW_EXIT_DATA, "an unknown exit status");
    FUZZ_REQUIRE(!r.oom && !r.messages.failed && !r.report.failed, "out of memory");
    FUZZ_REQUIRE((rc == 0) == (r.report.len > 0), "a report without success, or success without a report");
    FUZZ_REQUIRE(rc == 0 || r.messages.len > 0, "a failure without a message");
    FUZZ_REQUIRE(fuzz_valid_utf8(r.messages.s, r.messages.len), "the messages are not valid UTF-8");
    FUZZ_REQUIRE(fuzz_valid_utf8(r.report.s, r.report.len), "the report is not valid UTF-8");
    for (int pic = 0; pic < AVOW_PIC_COUNT; pic++) {
        FUZZ_REQUIRE(!r.pictures[pic].failed, "out of memory");
        FUZZ_REQUIRE(fuzz_valid_utf8(r.pictures[pic].s, r.pictures[pic].len), "a picture is not valid UTF-8");
        if (rc == 0 && o.pictures)
            FUZZ_REQUIRE((r.pictures[pic].len > 0) != (r.picture_missing[pic] != NULL),
                         "a picture neither drawn nor explained");
    }
    if (rc == 0 && o.json) FUZZ_REQUIRE(fuzz_valid_json(r.report.s, r.report.len), "the JSON report is not JSON");
    avow_run_free(&r);
    return 0;
}

/* test_isodate.c - ISO 8601 dates against known calendar facts. */
#include "cu_helpers.h"
#include "isodate.h"
#include <string.h>

static void known_days(void)
{
    int64_t m;
    CU_ASSERT_EQUAL(isodate_parse("1970-01-01", &m, NULL), 0);
    CU_ASSERT_EQUAL(m, 0);
    /* 2000-03-01 is day 11017 of the Unix epoch (POSIX date -d 2000-03-01 +%s / 86400). */
    CU_ASSERT_EQUAL(isodate_parse("2000-03-01T06:30", &m, NULL), 0);
    CU_ASSERT_EQUAL(m, 11017LL * 1440 + 390);
    char buf[20];
    isodate_format(m, 0, buf, sizeof buf);
    CU_ASSERT_STRING_EQUAL(buf, "2000-03-01T06:30");
    CU_ASSERT_EQUAL(isodate_parse("2027-03-02", &m, NULL), 0);
    isodate_month(m, buf, sizeof buf);
    CU_ASSERT_STRING_EQUAL(buf, "2027-03");
    CU_ASSERT_EQUAL(isodate_month_index(m), 2027 * 12 + 2);
}

static void leap_years(void)
{
    int64_t m;
    CU_ASSERT_EQUAL(isodate_parse("2024-02-29", &m, NULL), 0);
    CU_ASSERT_EQUAL(isodate_parse("2000-02-29", &m, NULL), 0);
    int off = -1;
    CU_ASSERT_EQUAL(isodate_parse("2027-02-29", &m, &off), -1);
    CU_ASSERT_EQUAL(off, 8);
    CU_ASSERT_EQUAL(isodate_parse("1900-02-29", &m, NULL), -1);
}

static void rejects(void)
{
    const char *bad[] = {"", "2027", "2027-13-01", "2027-00-10", "2027-04-31", "2027-03-02T24:00",
                         "2027-03-02T06:60", "2027-03-02 06:00", "2027-03-02T06:00Z", "27-03-02",
                         "2027-3-2", "2027-03-02T06:00:30"};
    int64_t m;
    for (size_t i = 0; i < sizeof bad / sizeof bad[0]; i++)
        CU_ASSERT_EQUAL(isodate_parse(bad[i], &m, NULL), -1);
}

static void round_trip(void)
{
    /* every day over 800 years formats back to what was parsed */
    for (int64_t d = -200000; d < 100000; d += 7) {
        char buf[20];
        int64_t m;
        isodate_format(d * 1440 + 61, 0, buf, sizeof buf);
        CU_ASSERT_EQUAL_FATAL(isodate_parse(buf, &m, NULL), 0);
        CU_ASSERT_EQUAL(m, d * 1440 + 61);
    }
}

int main(void)
{
    static const struct cu_case cases[] = {
        {"known days", known_days}, {"leap years", leap_years}, {"rejects", rejects},
        {"round trip", round_trip}};
    return CU_RUN_ALL("isodate", cases);
}

/* review_time.c - the times of a queue's events. */
#include "review/review_time.h"

#include <stdlib.h>
#include <string.h>
#include <time.h>

static long long days_from_civil(long long y, unsigned m, unsigned d)
{
	y -= m <= 2;
	long long era = (y >= 0 ? y : y - 399) / 400;
	unsigned yoe = (unsigned)(y - era * 400);
	unsigned doy = (153 * (m + (m > 2 ? -3 : 9)) + 2) / 5 + d - 1;
	unsigned doe = yoe * 365 + yoe / 4 - yoe / 100 + doy;
	return era * 146097 + (long long)doe - 719468;
}

long long rq_time(const char *s)
{
	unsigned v[6];
	static const unsigned dim[12] = {31, 29, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31};
	static const char shape[] = "dddd-dd-ddTdd:dd:ddZ";

	if (strlen(s) != 20)
		return -1;
	for (int i = 0; i < 20; i++)
		if (shape[i] == 'd' ? (s[i] < '0' || s[i] > '9') : s[i] != shape[i])
			return -1;
	static const int at[6] = {0, 5, 8, 11, 14, 17};
	for (int i = 0; i < 6; i++) {
		v[i] = 0;
		for (int k = at[i]; k < (i ? at[i] + 2 : 4); k++)
			v[i] = v[i] * 10 + (unsigned)(s[k] - '0');
	}
	if (v[1] < 1 || v[1] > 12 || v[2] < 1 || v[2] > dim[v[1] - 1] || v[3] > 23 || v[4] > 59 ||
	    v[5] > 60)
		return -1;
	if (v[1] == 2 && v[2] == 29 && !(v[0] % 4 == 0 && (v[0] % 100 || v[0] % 400 == 0)))
		return -1;
	return days_from_civil(v[0], v[1], v[2]) * 86400 + v[3] * 3600 + v[4] * 60 + v[5];
}

long long rq_since(const char *s)
{
	char t[21];
	if (strlen(s) != 10)
		return rq_time(s);
	memcpy(t, s, 10);
	memcpy(t + 10, "T00:00:00Z", 11);
	return rq_time(t);
}

int rq_now(char out[21], tm_buf *err)
{
	const char *env = getenv("TITLEMILL_NOW");
	if (env && *env) {
		if (rq_time(env) < 0) {
			tm_fail(err, TM_EFAIL, NULL, "TITLEMILL_NOW must be an ISO 8601 UTC time like 2026-12-02T09:30:00Z, not ", env);
			return TM_EINPUT;
		}
		memcpy(out, env, 21);
		return TM_OK;
	}
	time_t t = time(NULL);
	struct tm tm;
	if (!gmtime_r(&t, &tm) || !strftime(out, 21, "%Y-%m-%dT%H:%M:%SZ", &tm)) {
		tm_fail(err, TM_EFAIL, NULL, "cannot read the clock", NULL);
		return TM_EFAIL;
	}
	return TM_OK;
}

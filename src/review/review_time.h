/* review_time.h - the times of a queue's events: ISO 8601 UTC, to the
 * second, like 2026-12-02T09:30:00Z. */
#ifndef TM_REVIEW_TIME_H
#define TM_REVIEW_TIME_H

#include "core/buf.h"

/* The current time in ISO 8601 UTC (or TITLEMILL_NOW when set, checked);
 * returns 0 or -1 with a message. */
int rq_now(char out[21], tm_buf *err);
/* Seconds since 1970 of an ISO 8601 UTC time as rq_now writes it, or -1. */
long long rq_time(const char *iso);
/* A point in time a curator gives (--since): an ISO 8601 date
 * (2026-12-02, its start in UTC) or UTC time as rq_time; -1 when it is
 * neither. */
long long rq_since(const char *s);

#endif

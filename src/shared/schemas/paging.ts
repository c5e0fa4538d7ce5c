import { z } from "zod";

/** The most rows one page of an office list may hold: enough to scan, small enough for a phone. */
export const PAGE_SIZE_MAX = 100;

/**
 * `?page=&pageSize=` of the site office's long lists (subscribers, outbox, audit log). Pages count
 * from 1; a page past the end answers an empty page with the true total, so a stale address still
 * says how many there are.
 */
export function pageQueryShape(defaultPageSize: number) {
  return {
    page: z.coerce.number({ error: "must be a number" }).int("must be a whole number").min(1, "must be 1 or more").max(10_000, "must be at most 10000").default(1),
    pageSize: z.coerce
      .number({ error: "must be a number" })
      .int("must be a whole number")
      .min(1, "must be 1 or more")
      .max(PAGE_SIZE_MAX, `must be at most ${PAGE_SIZE_MAX}`)
      .default(defaultPageSize),
  };
}

/** What one page of a list answers beside its rows: how many match in all, which page this is, and how many rows a page holds. */
export const pageAnswerShape = {
  /** Every match. */
  total: z.number(),
  page: z.number(),
  pageSize: z.number(),
};

/** Rows to skip and to take for one page. */
export function pageWindow({ page, pageSize }: { page: number; pageSize: number }): { offset: number; limit: number } {
  return { offset: (page - 1) * pageSize, limit: pageSize };
}

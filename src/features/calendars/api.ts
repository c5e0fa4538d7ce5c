import { useMutation } from "@tanstack/react-query";
import type { CalendarFeed } from "#shared/schemas/reports.ts";
import { api } from "../../lib/api-client.ts";

/**
 * A personal calendar address: made (the earlier one stops working) or stopped. Nothing is read
 * back: the address is shown once, in the answer that made it, so there is no query to cache.
 */
export const feedPath = (slug: string) => `/api/projects/${slug}/calendar-feed`;

export const useMakeCalendarFeed = (slug: string) => useMutation({ mutationFn: () => api.post<CalendarFeed>(feedPath(slug)), meta: { quiet: true } });
export const useStopCalendarFeed = (slug: string) => useMutation({ mutationFn: () => api.delete<void>(feedPath(slug)), meta: { quiet: true } });


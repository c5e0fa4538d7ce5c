import { queryOptions, useQuery } from "@tanstack/react-query";
import { OfficeWaitingSchema, type OfficeWaiting } from "#shared/schemas/office.ts";
import { api } from "../../lib/api-client.ts";

/** The work waiting for the signed-in staff member; read afresh on every visit (it is personal and moves all day). */
export const waitingQueryOptions = () =>
  queryOptions({
    queryKey: ["office", "waiting"] as const,
    queryFn: async (): Promise<OfficeWaiting> => OfficeWaitingSchema.parse(await api.get<unknown>("/api/office/waiting")),
    staleTime: 0,
  });

export const useWaiting = () => useQuery(waitingQueryOptions());

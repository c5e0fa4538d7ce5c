import { queryOptions, type QueryKey } from "@tanstack/react-query";
import type { Audience } from "#shared/schemas/common.ts";
import type { FacilityAnswer } from "#shared/schemas/facility.ts";
import { api } from "./api-client.ts";

/*
 * The capacity blocks and plant systems a photo or an update may be tagged with, as the media
 * library and the update editor both offer them: read from GET /api/projects/:slug/facility (staff
 * see every audience) under the caller's own key, so each feature's invalidation reaches its entry.
 */

export interface FacilityTagChoice {
  id: number;
  name: string;
  audience: Audience;
}

export interface FacilityTagChoices {
  blocks: FacilityTagChoice[];
  plants: FacilityTagChoice[];
}

export const facilityTagChoicesQueryOptions = (queryKey: QueryKey, slug: string) =>
  queryOptions({
    queryKey,
    enabled: slug !== "",
    queryFn: async (): Promise<FacilityTagChoices> => {
      const f = await api.get<FacilityAnswer>(`/api/projects/${slug}/facility`);
      const pick = ({ id, name, audience }: FacilityTagChoice) => ({ id, name, audience });
      return { blocks: f.blocks.map(pick), plants: f.systems.map(pick) };
    },
  });

/** A choice's label: its name, and its audience where it is not public (so no one tags public content with it by mistake). */
export const facilityChoiceLabel = (c: FacilityTagChoice) => (c.audience === "public" ? c.name : `${c.name} (${c.audience} only)`);

import type { PressKitInput } from "#shared/schemas/writing-help.ts";
import { postForFile } from "./api-client.ts";
import { saveFile } from "./save-file.ts";

/**
 * POST /api/projects/:slug/press-kit (staff): photos, a story or a gallery filter as one zip,
 * saved by the browser. The media library and the story editor both offer it.
 */
export async function downloadPressKit(slug: string, input: PressKitInput): Promise<void> {
  const { blob, fileName } = await postForFile(`/api/projects/${slug}/press-kit`, input);
  saveFile(blob, fileName ?? `${slug}-press-kit.zip`);
}

import { QueryClient, QueryClientProvider, useMutation } from "@tanstack/react-query";
import { act, fireEvent, render, screen, waitFor } from "@testing-library/react";
import { createMemoryRouter, RouterProvider } from "react-router-dom";
import { afterEach, describe, expect, it, vi } from "vitest";
import type { PostStatus, WorkflowResult } from "../../src/shared/schemas/publishing.ts";
import { StoryCreateInputSchema } from "../../src/shared/schemas/stories.ts";
import { EditorShell, type EditorFrame } from "../../src/components/ui/editor-shell.tsx";
import { TextField } from "../../src/components/ui/field.tsx";
import { RouteErrorPage } from "../../src/app/pages/misc-pages.tsx";
import { postLoader } from "../../src/features/public-site/routes.tsx";
import { ApiError } from "../../src/lib/api-client.ts";
import type { WorkflowInput } from "../../src/lib/publishing.ts";
import { DraftAddressSchema, usePublishingDraft, WAITING_FOR } from "../../src/lib/use-publishing-draft.ts";

afterEach(() => vi.unstubAllGlobals());

const frame = (over: Partial<EditorFrame> = {}): EditorFrame => ({
  saving: false,
  dirty: false,
  onSave: () => undefined,
  conflict: false,
  onLoadTheirs: () => undefined,
  refusal: null,
  busyAction: null,
  onAction: () => undefined,
  dialog: null,
  onCloseDialog: () => undefined,
  onSchedule: () => undefined,
  onReturn: () => undefined,
  errors: {},
  ...over,
});

function shell(over: Partial<EditorFrame> = {}, saved = true) {
  return (
    <EditorShell
      {...frame(over)}
      sheet="Site office · Updates"
      title="Chillers set on the roof"
      noun="update"
      status="draft"
      audience="public"
      saved={saved}
      role="marketing"
      ownWork
      waiting={WAITING_FOR}
      unsavedNote="Save the draft first; then it can be submitted for review."
      renderProblem={(p) => <li key={p.code}>{p.message}</li>}
      timeZone="Europe/London"
      aside={<p>the side column</p>}
    >
      <p>the item's own fields</p>
    </EditorShell>
  );
}

describe("EditorShell", () => {
  it("frames the item's own fields with the head, the next steps and the side column", () => {
    const onAction = vi.fn();
    const { container } = render(<MemoryRouterFor>{shell({ onAction })}</MemoryRouterFor>);
    expect(screen.getByRole("heading", { name: "Chillers set on the roof" })).toBeTruthy();
    expect(screen.getByText("the item's own fields")).toBeTruthy();
    expect(screen.getByText("the side column").closest("aside")).not.toBeNull();
    fireEvent.click(screen.getByRole("button", { name: "Submit for review" }));
    expect(onAction).toHaveBeenCalledWith("submit");
    expect(container.textContent).not.toContain("Save the draft first");
  });

  it("says to save a new item first instead of offering steps it cannot take yet", () => {
    render(<MemoryRouterFor>{shell({}, false)}</MemoryRouterFor>);
    expect(screen.getByText("Save the draft first; then it can be submitted for review.")).toBeTruthy();
    expect(screen.queryByRole("group", { name: "Publishing" })).toBeNull();
    expect(screen.getByRole("button", { name: "Save draft" })).toBeTruthy();
  });

  it("names a newer version someone else saved and offers to load it", () => {
    const onLoadTheirs = vi.fn();
    render(<MemoryRouterFor>{shell({ conflict: true, onLoadTheirs })}</MemoryRouterFor>);
    expect(screen.getByText("Someone else saved this update since you opened it")).toBeTruthy();
    fireEvent.click(screen.getByRole("button", { name: "Load their version (drops yours)" }));
    expect(onLoadTheirs).toHaveBeenCalledTimes(1);
  });

  it("shows the schedule dialog with the error the server gave for the time", () => {
    render(<MemoryRouterFor>{shell({ dialog: "schedule", errors: { at: "must be in the future" } })}</MemoryRouterFor>);
    expect(screen.getByRole("dialog", { name: "Schedule publication" })).toBeTruthy();
    expect(screen.getByRole("alert").textContent).toContain("must be in the future");
  });
});

function MemoryRouterFor({ children }: { children: React.ReactNode }) {
  const router = createMemoryRouter([{ path: "/", element: children }]);
  return <RouterProvider router={router} />;
}

// ---------------------------------------------------------------------------------------------

interface Item {
  id: number;
  version: number;
  slug: string;
  projectSlug: string;
  title: string;
  status: PostStatus;
}

interface Values {
  title: string;
  slug: string;
  intro: string;
  audience: "public" | "investor" | "internal";
}

const Schema = StoryCreateInputSchema.pick({ title: true, intro: true, audience: true }).extend({ slug: DraftAddressSchema });
const valuesOf = (i: Item): Values => ({ title: i.title, slug: i.slug, intro: "", audience: "public" });

/** A minimal editor on the draft hook: a title and an address, saved through the request given. */
function Editor({ item, send }: { item: Item; send: (patch: unknown) => Promise<Item> }) {
  const save = useMutation({ mutationFn: send, meta: { quiet: true } });
  const create = useMutation({ mutationFn: async (_: unknown) => ({ id: 1 }) });
  const workflow = useMutation({ mutationFn: async (_: WorkflowInput): Promise<WorkflowResult> => ({ id: item.id, status: "in_review", scheduledFor: null, publishedAt: null }) as WorkflowResult });
  const draft = usePublishingDraft<Item, Values, unknown, unknown>({
    item,
    valuesOf,
    empty: { title: "", slug: "", intro: "", audience: "public" },
    schema: Schema,
    toCreate: (v) => v,
    toPatch: (v, version) => ({ version, title: v.title }),
    create,
    save,
    workflow,
    zone: "Europe/London",
    onCreated: () => undefined,
  });
  return (
    <EditorShell
      {...draft.frame}
      sheet="Site office · Photo stories"
      title={draft.values.title || "Untitled"}
      noun="photo story"
      status={item.status}
      audience={draft.values.audience}
      saved
      role="lead"
      ownWork
      waiting={WAITING_FOR}
      renderProblem={(p) => <li key={p.code}>{p.message}</li>}
      timeZone="Europe/London"
      aside={null}
    >
      <TextField label="Title" value={draft.values.title} error={draft.errors.title} onChange={(e) => draft.change("title", e.target.value)} />
      <TextField label="Address" value={draft.values.slug} error={draft.errors.slug} onChange={(e) => draft.change("slug", e.target.value)} />
    </EditorShell>
  );
}

function renderEditor(item: Item, send: (patch: unknown) => Promise<Item>) {
  const client = new QueryClient({ defaultOptions: { queries: { retry: false } } });
  const router = createMemoryRouter([{ path: "/", element: <Editor item={item} send={send} /> }]);
  return render(
    <QueryClientProvider client={client}>
      <RouterProvider router={router} />
    </QueryClientProvider>,
  );
}

const mine: Item = { id: 7, version: 3, slug: "the-tank", projectSlug: "aldermere-phase-2", title: "The bulk fuel tank", status: "draft" };

describe("usePublishingDraft", () => {
  it("saves with the version the draft was read from and says everything is saved", async () => {
    const send = vi.fn(async (patch: unknown) => ({ ...mine, version: 4, title: (patch as { title: string }).title }));
    renderEditor(mine, send);
    fireEvent.change(screen.getByLabelText("Title"), { target: { value: "The tank on its bund" } });
    expect(screen.getByText("Unsaved changes")).toBeTruthy();
    fireEvent.click(screen.getByRole("button", { name: "Save" }));
    await screen.findByText("All changes saved");
    expect(send.mock.calls[0]?.[0]).toEqual({ version: 3, title: "The tank on its bund" });
  });

  it("on a 409, keeps the writer's changes, names the conflict, and loads their version on request", async () => {
    const theirs: Item = { ...mine, version: 5, title: "Someone else's title" };
    const send = vi.fn(async () => {
      throw new ApiError(409, "conflict", "Someone else changed this photo story since you opened it.", {}, { error: { code: "conflict", message: "…", current: theirs } });
    });
    renderEditor(mine, send);
    fireEvent.change(screen.getByLabelText("Title"), { target: { value: "My own title" } });
    fireEvent.click(screen.getByRole("button", { name: "Save" }));
    await screen.findByText("Someone else saved this photo story since you opened it");
    expect((screen.getByLabelText("Title") as HTMLInputElement).value).toBe("My own title");
    fireEvent.click(screen.getByRole("button", { name: "Load their version (drops yours)" }));
    await waitFor(() => expect((screen.getByLabelText("Title") as HTMLInputElement).value).toBe("Someone else's title"));
    expect(screen.queryByText("Someone else saved this photo story since you opened it")).toBeNull();
    expect(screen.getByText("All changes saved")).toBeTruthy();
  });

  it("shows the shared schema's own message for a bad field, and sends nothing", async () => {
    const send = vi.fn(async () => mine);
    renderEditor(mine, send);
    fireEvent.change(screen.getByLabelText("Title"), { target: { value: "   " } });
    fireEvent.change(screen.getByLabelText("Address"), { target: { value: "Not An Address!" } });
    fireEvent.click(screen.getByRole("button", { name: "Save" }));
    // The same words the server answers with in `fields` (src/shared/schemas/stories.ts, posts.ts).
    const expected = Schema.safeParse({ title: "   ", intro: "", audience: "public", slug: "Not An Address!" });
    const messages = Object.fromEntries((expected.error?.issues ?? []).map((i) => [String(i.path[0]), i.message]));
    expect(messages).toEqual({ title: "is required", slug: "may hold only lower-case letters, digits and single hyphens" });
    await screen.findByText("is required");
    expect(screen.getByText("may hold only lower-case letters, digits and single hyphens")).toBeTruthy();
    expect(send).not.toHaveBeenCalled();
  });

  it("shows field errors the server names beside the fields", async () => {
    const send = vi.fn(async () => {
      throw new ApiError(409, "slug_taken", "The address is taken.", { slug: "is already used by another photo story in this project" });
    });
    renderEditor(mine, send);
    fireEvent.change(screen.getByLabelText("Address"), { target: { value: "taken-already" } });
    fireEvent.click(screen.getByRole("button", { name: "Save" }));
    await screen.findByText("is already used by another photo story in this project");
    expect(screen.queryByText(/Someone else saved/)).toBeNull();
  });
});

// ---------------------------------------------------------------------------------------------

describe("a route's loader and its error element", () => {
  it("when the update is not there, the loader's 404 ends in the route's error element naming what is missing, with a way back", async () => {
    const answers: Record<string, { status: number; body: unknown }> = {
      "/api/projects/aldermere-phase-2": { status: 200, body: { id: 1, slug: "aldermere-phase-2", name: "Aldermere Campus, Phase 2", timeZone: "Europe/London" } },
      "/api/projects/aldermere-phase-2/posts/no-such-update": { status: 404, body: { error: { code: "not_found", message: "No such update." } } },
    };
    vi.stubGlobal(
      "fetch",
      vi.fn(async (url: string) => {
        const a = answers[url] ?? { status: 500, body: { error: { code: "unexpected", message: `unexpected ${url}` } } };
        return new Response(JSON.stringify(a.body), { status: a.status, headers: { "content-type": "application/json" } });
      }),
    );
    const qc = new QueryClient({ defaultOptions: { queries: { retry: false } } });
    const router = createMemoryRouter(
      [{ path: "/projects/:slug/updates/:postSlug", loader: postLoader(qc), element: <p>the update</p>, errorElement: <RouteErrorPage what="update" /> }],
      { initialEntries: ["/projects/aldermere-phase-2/updates/no-such-update"] },
    );
    await act(async () => {
      render(
        <QueryClientProvider client={qc}>
          <RouterProvider router={router} />
        </QueryClientProvider>,
      );
    });
    await screen.findByRole("heading", { name: "No such update" });
    expect(screen.queryByText("the update")).toBeNull();
    expect(screen.getByRole("link", { name: "Back to the progress site" }).getAttribute("href")).toBe("/");
  });
});

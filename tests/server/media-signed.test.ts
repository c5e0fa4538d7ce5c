import { createHmac } from "node:crypto";
import sharp from "sharp";
import { beforeAll, describe, expect, it } from "vitest";
import type { MediaItem } from "../../src/shared/schemas/media.ts";
import { SIGNED_LINK_MAX_CACHE_SECONDS } from "../../server/media/media.links.ts";
import { signToken } from "../../server/subscribers/subscribers.tokens.ts";
import type { TestApp } from "../helpers/app.ts";
import { useMediaFixture, type MediaFixture } from "../helpers/media-fixture.ts";

const f = useMediaFixture("media-signed");
const { readyPhoto, review } = f;
let t: TestApp;
let lead: MediaFixture["lead"];
let visitor: MediaFixture["visitor"];
beforeAll(() => {
  ({ t, lead, visitor } = f);
});

const nameOf = (url: string) => url.replace(/^\/media\/v\//, "");
const inDays = (days: number) => new Date(Date.now() + days * 86_400_000);
const fetchSignedOut = (url: string) => visitor.agent.get(url).buffer(true);
// Owner ids far from any real post, so these rows stand for posts of their own.
let owner = 950_000;

/** A cleared photo used in one published investor post (and nowhere public). */
async function investorPhoto(): Promise<{ photo: MediaItem; owner: number; jpeg: MediaItem["variants"][number] }> {
  const photo = await readyPhoto();
  await review(photo.id, "cleared");
  owner += 1;
  await t.plumbline.media.setUsages("post", owner, [photo.id], "investor", true);
  return { photo, owner, jpeg: photo.variants.find((v) => v.format === "jpeg")! };
}

function expectHidden(res: { status: number; headers: Record<string, string>; body: { error?: { code?: string; message?: string } } }) {
  expect(res.status).toBe(404);
  expect(res.headers["cache-control"]).toBe("no-store");
  expect(res.body.error).toEqual({ code: "not_found", message: "There is no such image." });
}

describe("GET /media/s/:name — a signed, expiring derivative link", () => {
  it("an investor-only photo: the signed link gives the bytes to anyone, cached privately; its plain URL stays 404 to a visitor", async () => {
    const { jpeg } = await investorPhoto();
    const url = t.plumbline.media.signedVariantUrl(jpeg.url, inDays(30));
    expect(url).toMatch(/^\/media\/s\/[0-9a-f]{16}-\d+w\.jpg\?exp=\d+&sig=[A-Za-z0-9_-]{43}$/);

    const res = await fetchSignedOut(url).expect(200);
    expect(res.headers["content-type"]).toBe("image/jpeg");
    expect(Number(res.headers["content-length"])).toBe(jpeg.bytes);
    const meta = await sharp(res.body as Buffer).metadata();
    expect(meta).toMatchObject({ format: "jpeg", width: jpeg.width, height: jpeg.height });
    // Never public or immutable: no shared cache may hand an investor's photo to someone else.
    expect(res.headers["cache-control"]).toBe(`private, max-age=${SIGNED_LINK_MAX_CACHE_SECONDS}`);
    expect(res.headers["cross-origin-resource-policy"]).toBe("cross-origin");
    expect(res.headers["x-robots-tag"]).toBe("noindex");

    expectHidden(await fetchSignedOut(jpeg.url));
  });

  it("caches no longer than the link lives: ten minutes left is max-age 600 or just under", async () => {
    const { jpeg } = await investorPhoto();
    const res = await fetchSignedOut(t.plumbline.media.signedVariantUrl(jpeg.url, new Date(Date.now() + 600_000))).expect(200);
    const maxAge = Number(/^private, max-age=(\d+)$/.exec(res.headers["cache-control"] as string)?.[1]);
    expect(maxAge).toBeGreaterThan(590);
    expect(maxAge).toBeLessThanOrEqual(600);
  });

  it("answers 304 to a revalidation with the same ETag", async () => {
    const { jpeg } = await investorPhoto();
    const url = t.plumbline.media.signedVariantUrl(jpeg.url, inDays(30));
    const first = await fetchSignedOut(url).expect(200);
    const etag = first.headers.etag as string;
    expect(etag).toMatch(/^"[0-9a-f]{16}"$/);
    const again = await visitor.agent.get(url).set("If-None-Match", etag);
    expect(again.status).toBe(304);
    expect(again.headers["cache-control"]).toMatch(/^private, max-age=\d+$/);
    // A forged link learns nothing from an ETag either.
    expectHidden(await visitor.agent.get(url.replace(/sig=./, "sig=" + (url.match(/sig=(.)/)![1] === "A" ? "B" : "A"))).set("If-None-Match", etag));
  });

  it("an altered, forged, moved or missing signature, or an unknown name, is 404 like a hidden image", async () => {
    const { photo, jpeg } = await investorPhoto();
    const url = t.plumbline.media.signedVariantUrl(jpeg.url, inDays(30));
    const { exp, sig } = Object.fromEntries(new URL(url, "http://x").searchParams) as { exp: string; sig: string };
    const name = nameOf(jpeg.url);
    const other = nameOf(photo.variants.find((v) => v.url !== jpeg.url)!.url);
    const flip = (s: string, i: number) => s.slice(0, i) + (s[i] === "A" ? "B" : "A") + s.slice(i + 1);
    // Base64url's last character of 32 bytes carries two spare bits: a lenient decoder reads both the same.
    const alphabet = "ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789-_";
    const spareBits = sig.slice(0, -1) + alphabet[alphabet.indexOf(sig.at(-1)!) ^ 1];
    const cases = [
      `/media/s/${name}?exp=${exp}&sig=${flip(sig, 10)}`,
      `/media/s/${name}?exp=${exp}&sig=${spareBits}`,
      `/media/s/${name}?exp=${exp}&sig=${sig}=`,
      `/media/s/${name}?exp=${exp}&sig=${sig.slice(0, 22)}`,
      `/media/s/${name}?exp=${exp}&sig=`,
      `/media/s/${name}?exp=${exp}`,
      // The signature covers the name and the expiry.
      `/media/s/${other}?exp=${exp}&sig=${sig}`,
      `/media/s/${name}?exp=${Number(exp) + 86_400}&sig=${sig}`,
      // Signed properly, but no such derivative; and a name that is no derivative at all.
      t.plumbline.media.signedVariantUrl("0123456789abcdef-320w.jpg", inDays(30)),
      `/media/s/..%2F..%2Fpackage.json?exp=${exp}&sig=${sig}`,
    ];
    for (const bad of cases) expectHidden(await fetchSignedOut(bad));
    // The genuine link still answers.
    await fetchSignedOut(url).expect(200);
  });

  it("a signature made for another purpose with TOKEN_SECRET is never a media signature", async () => {
    const { jpeg } = await investorPhoto();
    const name = nameOf(jpeg.url);
    const exp = Math.ceil(inDays(30).getTime() / 1000);
    // The same message under the undivided secret.
    const raw = createHmac("sha256", t.config.TOKEN_SECRET).update(`${name}\n${exp}`).digest("base64url");
    expectHidden(await fetchSignedOut(`/media/s/${name}?exp=${exp}&sig=${raw}`));
    // A subscriber link's own signature.
    const subscriberSig = signToken(t.config.TOKEN_SECRET, { subscriberId: 1, purpose: "unsubscribe", expiresAt: inDays(30) }).split(".")[1]!;
    expectHidden(await fetchSignedOut(`/media/s/${name}?exp=${exp}&sig=${subscriberSig}`));
  });

  it("an expired link is 410 in the error shape; an expired forgery is still 404", async () => {
    const { jpeg } = await investorPhoto();
    const url = t.plumbline.media.signedVariantUrl(jpeg.url, new Date(Date.now() - 60_000));
    const res = await fetchSignedOut(url);
    expect(res.status).toBe(410);
    expect(res.headers["cache-control"]).toBe("no-store");
    expect(res.body).toEqual({ error: { code: "link_expired", message: expect.stringMatching(/expired/) } });
    expectHidden(await fetchSignedOut(url.replace(/exp=(\d+)/, (_m, e: string) => `exp=${Number(e) - 1}`)));
  });

  it("refuses a bad query with 400 validation naming the field, before looking at anything", async () => {
    const { jpeg } = await investorPhoto();
    const name = nameOf(jpeg.url);
    for (const q of ["exp=soon&sig=x", "sig=x", "exp=-5&sig=x", "exp=1.5&sig=x", "exp=1&exp=2&sig=x"]) {
      const res = await fetchSignedOut(`/media/s/${name}?${q}`);
      expect(res.status, q).toBe(400);
      expect(res.headers["cache-control"]).toBe("no-store");
      expect(res.body.error).toMatchObject({ code: "validation", fields: { exp: expect.any(String) } });
    }
  });

  it("grants the investor audience, never staff's: unreviewed, unused, unpublished, withdrawn or restricted photos are 404", async () => {
    // Staff may see an unreviewed, unused photo through /media/v/; a signed link may not.
    const unreviewed = await readyPhoto();
    const u = unreviewed.variants[0]!;
    await lead.agent.get(u.url).expect(200);
    expectHidden(await fetchSignedOut(t.plumbline.media.signedVariantUrl(u.url, inDays(30))));
    // Cleared but used only in a draft.
    await review(unreviewed.id, "cleared");
    owner += 1;
    await t.plumbline.media.setUsages("post", owner, [unreviewed.id], "investor", false);
    expectHidden(await fetchSignedOut(t.plumbline.media.signedVariantUrl(u.url, inDays(30))));
    // Used in internal content only.
    owner += 1;
    await t.plumbline.media.setUsages("post", owner, [unreviewed.id], "internal", true);
    expectHidden(await fetchSignedOut(t.plumbline.media.signedVariantUrl(u.url, inDays(30))));

    const { photo, owner: post, jpeg } = await investorPhoto();
    const url = t.plumbline.media.signedVariantUrl(jpeg.url, inDays(30));
    await fetchSignedOut(url).expect(200);
    await t.plumbline.media.setUsages("post", post, [photo.id], "investor", false);
    expectHidden(await fetchSignedOut(url));
    await t.plumbline.media.setUsages("post", post, [photo.id], "investor", true);
    await fetchSignedOut(url).expect(200);
    await review(photo.id, "restricted");
    expectHidden(await fetchSignedOut(url));
  });

  it("a photo in public content answers its signed link too (still privately cached)", async () => {
    const photo = await readyPhoto();
    await review(photo.id, "cleared");
    owner += 1;
    await t.plumbline.media.setUsages("post", owner, [photo.id], "public", true);
    const res = await fetchSignedOut(t.plumbline.media.signedVariantUrl(photo.variants[0]!.url, inDays(30))).expect(200);
    expect(res.headers["cache-control"]).toMatch(/^private, max-age=\d+$/);
  });

  it("refreshSignedUrls signs authentic links afresh (escaped or not) and leaves anything else alone", async () => {
    const { jpeg } = await investorPhoto();
    const old = t.plumbline.media.signedVariantUrl(jpeg.url, new Date(Date.now() - 86_400_000));
    await fetchSignedOut(old).expect(410);
    const forged = old.replace(/sig=(.)/, (_m, c: string) => `sig=${c === "A" ? "B" : "A"}`);
    const html = `<img src="https://progress.example${old.replace("&", "&amp;")}"> <img src="${forged}"> ${old} /media/v/${nameOf(jpeg.url)}`;
    const fresh = t.plumbline.media.refreshSignedUrls(html, inDays(1));
    const links = [...fresh.matchAll(/\/media\/s\/[^"\s]+/g)].map((m) => m[0]);
    expect(links).toHaveLength(3);
    expect(links[1]).toBe(forged);
    expect(links[0]).toContain("&amp;sig=");
    for (const link of [links[0]!.replace("&amp;", "&"), links[2]!]) {
      expect(link).not.toBe(old);
      await fetchSignedOut(link).expect(200);
    }
    expect(fresh).toContain(` /media/v/${nameOf(jpeg.url)}`);
  });
});

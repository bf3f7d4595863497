import { eq } from "drizzle-orm";
import type { BrowserContext, Page } from "playwright-core";
import { demoPassword } from "@/datasets";
import { datasets, outbox, versions } from "@/db/schema";
import type { Role } from "@/schemas/account";
import { issueEmailToken } from "@/server/services/accounts/email-tokens";
import { createUser, findUserByEmail } from "@/server/services/users";
import type { RunningServer } from "./harness";

/**
 * Every screen of the web app, with the address that opens it and who may see it: the page-level checks (axe,
 * titles, headings) walk this list, and fail when a route file in app/ has no entry here, so a new screen cannot skip
 * them.
 */
export interface ScreenVisit {
  /** The route file under app/ this visit renders ("datasets/[slug]"). */
  route: string;
  /** The address to open; built from the demo data where it needs an id. */
  path: (fx: ScreenFixture) => string | Promise<string>;
  /** Signed out (undefined) or the demo account whose role sees this screen. */
  as?: Role;
}

export interface ScreenFixture {
  slug: string;
  versionId: string;
  outboxId: string;
  /** A fresh e-mailed link's secret (a confirmation link works once, so each visit gets its own). */
  emailLink(purpose: "verify" | "reset" | "invite"): Promise<string>;
}

export const screenVisits: ScreenVisit[] = [
  { route: "index", path: () => "/?crop=soybean&nutrient=P&placement=2x2-band" },
  { route: "datasets/index", path: () => "/datasets" },
  { route: "datasets/[slug]", path: (fx) => `/datasets/${fx.slug}` },
  { route: "developers/index", path: () => "/developers" },
  { route: "sign-in", path: () => "/sign-in" },
  { route: "sign-up", path: () => "/sign-up" },
  { route: "forgot-password", path: () => "/forgot-password" },
  { route: "reset-password", path: async (fx) => `/reset-password?token=${await fx.emailLink("reset")}` },
  { route: "verify", path: async (fx) => `/verify?token=${await fx.emailLink("verify")}` },
  { route: "invite", path: async (fx) => `/invite?token=${await fx.emailLink("invite")}` },
  { route: "+not-found", path: () => "/no-such-page" },
  { route: "account/index", path: () => "/account", as: "member" },
  { route: "curate/index", path: () => "/curate", as: "curator" },
  { route: "curate/new", path: () => "/curate/new", as: "curator" },
  { route: "curate/datasets/[slug]/index", path: (fx) => `/curate/datasets/${fx.slug}`, as: "curator" },
  { route: "curate/datasets/[slug]/details", path: (fx) => `/curate/datasets/${fx.slug}/details`, as: "curator" },
  { route: "curate/versions/[id]", path: (fx) => `/curate/versions/${fx.versionId}`, as: "curator" },
  { route: "curate/compare", path: (fx) => `/curate/compare?dataset=${fx.slug}`, as: "curator" },
  { route: "curate/index", path: () => "/curate", as: "reviewer" },
  { route: "admin/index", path: () => "/admin", as: "admin" },
  { route: "admin/outbox/index", path: () => "/admin/outbox", as: "admin" },
  // Public screens that show more to a signed-in reader: following a dataset, making API tokens.
  { route: "datasets/[slug]", path: (fx) => `/datasets/${fx.slug}`, as: "member" },
  { route: "developers/index", path: () => "/developers", as: "curator" },
  { route: "admin/outbox/[id]", path: (fx) => `/admin/outbox/${fx.outboxId}`, as: "admin" },
];

/** Ids and e-mailed tokens from the demo data, so each screen opens on real content rather than an error. */
export async function screenFixture(server: RunningServer): Promise<ScreenFixture> {
  const db = server.ctx.db;
  const [dataset] = await db.select().from(datasets).where(eq(datasets.slug, "soybean-starter-p-placement"));
  if (!dataset) throw new Error("the demo data has no soybean-starter-p-placement dataset");
  const own = await db.select().from(versions).where(eq(versions.datasetId, dataset.id));
  const published = own
    .filter((v) => v.state === "published")
    .sort((a, b) => (b.publishedAt?.getTime() ?? 0) - (a.publishedAt?.getTime() ?? 0));
  const [message] = await db
    .insert(outbox)
    .values({ kind: "test", to: "someone@tallgrass.test", subject: "Review requested", text: "A version waits for review." })
    .returning();
  const member = await findUserByEmail(db, "member@plotbank.test");
  let n = 0;
  // A confirmation link for a new, unconfirmed account; a reset link for the demo member; an invitation for a curator.
  const emailLink = async (purpose: "verify" | "reset" | "invite") => {
    n++;
    const who =
      purpose === "verify"
        ? await createUser(db, {
            email: `unconfirmed-${n}@tallgrass.test`,
            displayName: "Unconfirmed Visitor",
            password: demoPassword,
            role: "member",
            verified: false,
          })
        : purpose === "reset"
          ? member
          : null;
    const email = who?.email ?? `invited-${n}@tallgrass.test`;
    return (await issueEmailToken(db, { purpose, email, userId: who?.id, role: purpose === "invite" ? "curator" : undefined })).secret;
  };
  return {
    slug: dataset.slug,
    versionId: published[0]!.id,
    outboxId: message!.id,
    emailLink,
  };
}

/** Sign a browser context in as the demo account of a role (the cookie lands in the context's jar). */
export async function signInAs(context: BrowserContext, baseUrl: string, role: Role) {
  const res = await context.request.post(`${baseUrl}/api/v1/session`, { data: { email: `${role}@plotbank.test`, password: demoPassword } });
  if (!res.ok()) throw new Error(`sign-in as ${role} failed: ${res.status()}`);
}

/** Open a screen and wait until it has drawn its content: its h1, no loading state, the network quiet. */
export async function openScreen(page: Page, url: string) {
  await page.goto(url);
  await page.locator("h1").first().waitFor();
  await page.waitForLoadState("networkidle");
  await page
    .waitForFunction(() => !document.querySelector('[aria-busy="true"], [role="progressbar"]'), undefined, { timeout: 15_000 })
    .catch(() => undefined);
}

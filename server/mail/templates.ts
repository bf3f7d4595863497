/**
 * Plotbank's e-mails: plain text first (what most mail clients show in a preview, and what a screen reader reads),
 * with a simple HTML twin. Every link is absolute, built on the app's public URL.
 */
export interface RenderedMail {
  subject: string;
  text: string;
  html: string;
}

const escapeHtml = (value: string) =>
  value.replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c]!);

/** Screen paths the messages link to; the web app routes them. */
const mailPaths = {
  verify: (token: string) => `/verify?token=${encodeURIComponent(token)}`,
  reset: (token: string) => `/reset-password?token=${encodeURIComponent(token)}`,
  invite: (token: string) => `/invite?token=${encodeURIComponent(token)}`,
  signIn: () => "/sign-in",
  // The review queue is the top of the curator workbench.
  review: () => "/curate",
  dataset: (slug: string) => `/datasets/${encodeURIComponent(slug)}`,
  account: () => "/account",
};

interface Block {
  paragraphs: string[];
  action?: { label: string; url: string };
  footer?: string;
}

function render(subject: string, greeting: string, block: Block): RenderedMail {
  const lines = [greeting, "", ...block.paragraphs.flatMap((p) => [p, ""])];
  if (block.action) lines.push(`${block.action.label}:`, block.action.url, "");
  if (block.footer) lines.push(block.footer, "");
  lines.push("— Plotbank");
  const html = [
    `<!doctype html><html><body style="font-family:Inter,Arial,sans-serif;color:#1c2a22;line-height:1.5;max-width:560px">`,
    `<p>${escapeHtml(greeting)}</p>`,
    ...block.paragraphs.map((p) => `<p>${escapeHtml(p).replace(/\n/g, "<br>")}</p>`),
    block.action
      ? `<p><a href="${escapeHtml(block.action.url)}" style="display:inline-block;padding:12px 18px;background:#2f6b3a;color:#fff;border-radius:8px;text-decoration:none">${escapeHtml(block.action.label)}</a></p>` +
        `<p style="font-size:13px;color:#4f5a52">Or paste this address into your browser: ${escapeHtml(block.action.url)}</p>`
      : "",
    block.footer ? `<p style="font-size:13px;color:#4f5a52">${escapeHtml(block.footer)}</p>` : "",
    `<p>— Plotbank</p></body></html>`,
  ].join("\n");
  return { subject, text: lines.join("\n"), html };
}

const notYou = "If you did not ask for this, ignore this message; nothing changes.";

export const templates = {
  verification: (p: { publicUrl: string; displayName: string; token: string }) =>
    render("Confirm your e-mail address for Plotbank", `Hello ${p.displayName},`, {
      paragraphs: ["Confirm this address to finish creating your Plotbank account. The link works once, for 48 hours."],
      action: { label: "Confirm my e-mail address", url: p.publicUrl + mailPaths.verify(p.token) },
      footer: notYou,
    }),

  alreadyRegistered: (p: { publicUrl: string; displayName: string }) =>
    render("You already have a Plotbank account", `Hello ${p.displayName},`, {
      paragraphs: [
        "Someone tried to create a Plotbank account with this address, which already has one. You can sign in, or set a new password from the sign-in screen.",
      ],
      action: { label: "Sign in", url: p.publicUrl + mailPaths.signIn() },
      footer: notYou,
    }),

  passwordChanged: (p: { publicUrl: string; displayName: string; how: "changed" | "reset"; revokedTokens: number; keptTokens: number }) =>
    render("Your Plotbank password was changed", `Hello ${p.displayName},`, {
      paragraphs: [
        p.how === "reset"
          ? "The password of your Plotbank account was just reset with an e-mailed link, and every session of the account was signed out."
          : "The password of your Plotbank account was just changed, and every other session of the account was signed out.",
        p.revokedTokens > 0
          ? `${p.revokedTokens} API token${p.revokedTokens === 1 ? " was" : "s were"} revoked with it: scripts that used ${p.revokedTokens === 1 ? "it" : "them"} need a new token from the Developers screen.`
          : p.keptTokens > 0
            ? `Your ${p.keptTokens} API token${p.keptTokens === 1 ? " was" : "s were"} kept, as you chose. Revoke any you do not recognise on the Developers screen.`
            : "The account has no API tokens.",
        "If you did not do this, reset your password now and tell an administrator.",
      ],
      action: { label: "Open your account", url: p.publicUrl + mailPaths.account() },
    }),

  passwordReset: (p: { publicUrl: string; displayName: string; token: string }) =>
    render("Set a new Plotbank password", `Hello ${p.displayName},`, {
      paragraphs: [
        "Use this link to set a new password. It works once, for one hour. Setting a new password signs you out everywhere else.",
      ],
      action: { label: "Set a new password", url: p.publicUrl + mailPaths.reset(p.token) },
      footer: notYou,
    }),

  invitation: (p: { publicUrl: string; inviterName: string; role: string; token: string }) =>
    render(`You are invited to Plotbank as a ${p.role}`, "Hello,", {
      paragraphs: [
        `${p.inviterName} invited you to Plotbank, the versioned fertilizer field-trial library, as a ${p.role}.`,
        "Choose your name and a password to accept. The invitation works once, for 7 days.",
      ],
      action: { label: "Accept the invitation", url: p.publicUrl + mailPaths.invite(p.token) },
      footer: "If you were not expecting this, ignore it; no account is made until you accept.",
    }),

  reviewRequested: (p: {
    publicUrl: string;
    reviewerName: string;
    datasetTitle: string;
    semver: string;
    submitterName: string;
    changelog: string;
  }) =>
    render(`Review requested: ${p.datasetTitle} ${p.semver}`, `Hello ${p.reviewerName},`, {
      paragraphs: [
        `${p.submitterName} submitted version ${p.semver} of “${p.datasetTitle}” for review.`,
        p.changelog ? `What changed:\n${p.changelog}` : "No change notes were given.",
      ],
      action: { label: "Open the review queue", url: p.publicUrl + mailPaths.review() },
    }),

  reviewDecision: (p: {
    publicUrl: string;
    submitterName: string;
    datasetTitle: string;
    slug: string;
    semver: string;
    decision: "approved" | "returned";
    reviewerName: string;
    comment: string;
  }) =>
    render(
      p.decision === "approved" ? `Approved: ${p.datasetTitle} ${p.semver}` : `Returned for changes: ${p.datasetTitle} ${p.semver}`,
      `Hello ${p.submitterName},`,
      {
        paragraphs: [
          p.decision === "approved"
            ? `${p.reviewerName} approved version ${p.semver} of “${p.datasetTitle}”.`
            : `${p.reviewerName} returned version ${p.semver} of “${p.datasetTitle}” for changes. It is a draft again.`,
          p.comment ? `The reviewer's comment:\n${p.comment}` : "The reviewer left no comment.",
        ],
        action: { label: "Open the dataset", url: p.publicUrl + mailPaths.dataset(p.slug) },
      },
    ),

  newVersion: (p: { publicUrl: string; followerName: string; datasetTitle: string; slug: string; semver: string; changelog: string }) =>
    render(`New version of ${p.datasetTitle}: ${p.semver}`, `Hello ${p.followerName},`, {
      paragraphs: [
        `Version ${p.semver} of “${p.datasetTitle}”, a dataset you follow, has been published.`,
        p.changelog ? `What changed:\n${p.changelog}` : "No change notes were given.",
        "Analyses you saved keep citing the version they were made with; open the dataset to compare.",
      ],
      action: { label: "Open the dataset", url: p.publicUrl + mailPaths.dataset(p.slug) },
      footer: `You get this because you follow this dataset. Stop following it from your account: ${p.publicUrl}${mailPaths.account()}`,
    }),
};

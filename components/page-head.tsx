import Constants from "expo-constants";
import Head from "expo-router/head";

const siteName = Constants.expoConfig?.name ?? "Plotbank";
/** The site's own description (app.json `web.description`, which the web export also writes into index.html). */
const siteDescription = Constants.expoConfig?.web?.description ?? "";

/**
 * The document's title ("Datasets · Plotbank") and meta description for the screen being shown. Expo Router's Head
 * replaces the tags the served HTML carries (the server marks them for it), so a page never has two descriptions.
 */
export function PageHead({ title, description }: { title: string; description?: string }) {
  const own = (description ?? "").replace(/\s+/g, " ").trim();
  // A line too short to say what the page is ("You are invited as a curator.") is followed by what the site is.
  const text = own.length >= 50 ? own : [own, siteDescription].filter(Boolean).join(" ");
  return (
    <Head>
      <title>{`${title} · ${siteName}`}</title>
      <meta name="description" content={text.length > 300 ? `${text.slice(0, 299).replace(/\s+\S*$/, "")}…` : text} />
    </Head>
  );
}

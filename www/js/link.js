// The scene in the address: kept current as the scene changes (without history entries),
// copied on request, and read when the page opens.
import { app, $, showProblem, says } from "./state.js";

/** Keeps the address in step with the scene. */
export function updateLink() {
  const link = `#s=${app.viewer.shareFragment()}`;
  if (link === app.lastLink) return;
  app.lastLink = link;
  history.replaceState(null, "", link);
  if (app.embed) $("open-full").href = fullPageAddress();
}

/** This address without ?embed: the link an embedded page offers. */
export function fullPageAddress() {
  const full = new URL(location.href);
  full.searchParams.delete("embed");
  return full.href;
}

export async function copyLink() {
  const status = $("copy-status");
  try {
    await navigator.clipboard.writeText(location.href);
    status.textContent = "Link copied.";
  } catch {
    // No clipboard permission (e.g. an insecure context): offer the link to copy by hand.
    window.prompt("Copy this link:", location.href);
    status.textContent = "";
  }
}

/** Opens the scene of a `#s=...` address; a damaged link is explained and the default kept. */
export function openFromAddress() {
  if (!location.hash.startsWith("#s=")) return;
  try {
    // A link made under an older renderer revision opens with a notice.
    const notice = app.viewer.setSceneFromLink(location.hash.slice(3));
    if (notice) showProblem(notice);
  } catch (e) {
    showProblem(`${says(e)}. Showing the default scene.`);
  }
}

import { CopyButton } from "@/features/catalogue/components/copy-button";

/** The download URL of a version on this server. */
export const downloadUrl = (versionId: string, query = "format=csv") => `${window.location.origin}/api/v1/versions/${versionId}/download${query ? `?${query}` : ""}`;

export function curlExample(versionId: string, token: boolean) {
  return [
    token ? `# A personal API token (API page → tokens); needed for versions that are not released yet.` : `# Released data needs no token.`,
    `curl -fL ${token ? '-H "Authorization: Bearer $TAULINE_TOKEN" ' : ""}\\`,
    `  -o merrow.csv \\`,
    `  "${downloadUrl(versionId, "format=csv&qc=pass_suspect")}"`,
  ].join("\n");
}

export function pythonExample(versionId: string) {
  return [
    "import os, requests",
    "",
    `url = "${downloadUrl(versionId, "")}"`,
    'params = {"format": "parquet", "variables": "wind_speed,magnitude_of_surface_downward_stress", "qc": "pass"}',
    'token = os.environ.get("TAULINE_TOKEN")  # only needed for drafts',
    'headers = {"Authorization": f"Bearer {token}"} if token else {}',
    "with requests.get(url, params=params, headers=headers, stream=True, timeout=60) as r:",
    "    r.raise_for_status()",
    '    with open("merrow.parquet", "wb") as f:',
    "        for chunk in r.iter_content(1 << 20):",
    "            f.write(chunk)",
    "",
    "# import pandas as pd; df = pd.read_parquet(\"merrow.parquet\")",
  ].join("\n");
}

/** A titled code example with a copy button (also used on the API page). */
export function Snippet({ title, code }: { title: string; code: string }) {
  return (
    <figure className="space-y-1">
      <figcaption className="flex items-center justify-between gap-2 text-sm font-semibold">
        {title} <CopyButton text={code} what={`${title} example`} />
      </figcaption>
      {/* Focusable, so the keyboard can scroll a long line sideways. */}
      <pre tabIndex={0} className="overflow-x-auto rounded-md border border-line bg-surface p-3 font-mono text-sm">
        {code}
      </pre>
    </figure>
  );
}

/** curl and Python examples for one version. */
export function ScriptExamples({ versionId, needsToken }: { versionId: string; needsToken: boolean }) {
  return (
    <div className="space-y-3">
      <Snippet title="curl" code={curlExample(versionId, needsToken)} />
      <Snippet title="Python" code={pythonExample(versionId)} />
    </div>
  );
}

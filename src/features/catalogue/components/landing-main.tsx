import { paths } from "@/config/paths";
import { Link } from "react-router-dom";
import { Section } from "@/components/ui/section";
import { DownloadForm, ReleaseFiles } from "@/features/downloads/components/download-panel";
import { ScriptExamples } from "@/features/downloads/components/script-examples";
import { useLanding } from "../api/get-landing";
import { LandingSections } from "./dataset-landing";

/** The landing-page part of a dataset page: coverage, variables, citation, downloads and scripts. */
export function LandingMain({ datasetId }: { datasetId: string }) {
  const { data: l } = useLanding(datasetId);
  if (!l) return null;
  const current = l.releases.find((r) => !r.retracted && r.versionId === l.version?.id) ?? null;
  const released = !!current;
  return (
    <>
      <LandingSections l={l} />
      {l.version ? (
        <Section
          title="Download"
          description={
            released
              ? `Version ${l.version.number}, release ${current.releaseNumber}. Times are ISO 8601 in UTC; each variable comes with its QC flag column.`
              : `Version ${l.version.number} is not released: only members of the project can download it.`
          }
        >
          <div className="space-y-6">
            {current ? <ReleaseFiles release={current} /> : null}
            <div>
              <h3 className="mb-2 font-semibold">{released ? "Subset or another format" : "Download this draft"}</h3>
              <DownloadForm l={l} />
            </div>
          </div>
        </Section>
      ) : null}
      {l.version ? (
        <Section
          title="Download by script"
          description={
            <>
              Same data from the versioned API. {released ? "Released data needs no token." : "Drafts need a personal API token."} See the{" "}
              <Link to={paths.apiDocs()}>API page</Link> for tokens and every endpoint.
            </>
          }
        >
          <ScriptExamples versionId={l.version.id} needsToken={!released} />
        </Section>
      ) : null}
    </>
  );
}

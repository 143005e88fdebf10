// The streaming ingest lives with the pipeline so the worker and `tauline check` share one code path.
export { InputError, openCanonicalStream, type CanonicalStream, type StreamOptions } from "../../server/pipeline/read-csv";

import { z } from "zod";
import { idSchema } from "@shared/schemas/common";
import { logger } from "../lib/logger";
import { INSPECT_UPLOAD, INSPECT_UPLOAD_QUEUE, inspectStoredUpload } from "../services/uploads";
import type { JobDefinition } from "./index";

const payloadSchema = z.object({ uploadId: idSchema });

/**
 * The full-file scan of a stored upload (ragged rows, unreadable numbers and times, mixed zones, formula-like
 * cells …), queued when a file too large to scan at finish has been recorded. Idempotent: a scan only writes while
 * the inspection still says "checking", so a retry after a crash simply scans again.
 */
export const inspectUploadJob: JobDefinition = {
  name: INSPECT_UPLOAD,
  queue: INSPECT_UPLOAD_QUEUE,
  async register(boss) {
    return boss.work<{ uploadId: string }>(INSPECT_UPLOAD, { pollingIntervalSeconds: 1, batchSize: 1 }, async ([job]) => {
      const { uploadId } = payloadSchema.parse(job!.data);
      const t0 = performance.now();
      await inspectStoredUpload(uploadId);
      logger.info({ uploadId, seconds: Number(((performance.now() - t0) / 1000).toFixed(2)) }, `[${INSPECT_UPLOAD}][${job!.id}] scanned`);
    });
  },
};

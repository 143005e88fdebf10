import { randomUUID } from "node:crypto";
import type { RequestHandler } from "express";
import type { IncomingMessage, ServerResponse } from "node:http";
import { finished } from "node:stream";
import { Server, EVENTS } from "@tus/server";
import { NodeRequest, sendNodeResponse } from "srvx/node";
import type { Upload } from "@tus/utils";
import { idSchema } from "@shared/schemas/common";
import { auth } from "../auth";
import { AppError } from "../lib/errors";
import { storageDir } from "../lib/file-store";
import { logger } from "../lib/logger";
import type { SessionUser } from "../middleware/require-session";
import { authenticateToken, bearerToken } from "../services/tokens";
import { assertCanUploadTo, recordFinishedUpload } from "../services/uploads";
import { uploadConfig } from "./config";
import { HashingFileStore } from "./hashing-store";

type TusRequest = Parameters<NonNullable<ConstructorParameters<typeof Server>[0]["onIncomingRequest"]>>[0];

/** What tus sends back for a refused request: a status and one plain sentence. */
const refuse = (status_code: number, message: string) => ({ status_code, body: `${message}\n` });

function fromAppError(e: unknown): never {
  if (e instanceof AppError) {
    if (e.status >= 500) logger.error({ err: e.cause ?? e }, e.message);
    throw refuse(e.status, e.message);
  }
  if ((e as { status_code?: number }).status_code) throw e;
  logger.error({ err: e }, "upload hook failed");
  throw refuse(500, "The upload could not be handled; try again in a moment.");
}

/** Parses tus Upload-Metadata ("key base64,key base64"). */
function parseMetadata(header: string | null): Record<string, string> {
  const out: Record<string, string> = {};
  for (const pair of (header ?? "").split(",")) {
    const [k, v] = pair.trim().split(" ");
    if (k) out[k] = v ? Buffer.from(v, "base64").toString("utf8") : "";
  }
  return out;
}

async function sessionUser(req: TusRequest): Promise<SessionUser> {
  // Scripts upload with a personal API token of scope "upload" instead of a session cookie.
  const bearer = bearerToken(req.headers.get("authorization"));
  if (bearer) return (await authenticateToken(bearer, "upload")).user;
  const session = await auth.api.getSession({ headers: req.headers });
  const u = session?.user;
  if (!u || u.banned) throw refuse(401, "Sign in to upload files.");
  return { id: u.id, name: u.name, email: u.email, emailVerified: u.emailVerified, isAdmin: u.role === "admin" };
}

/** Client file names are kept as metadata only: one line, no control characters, at most 255 characters. */
export function cleanFileName(name: string | undefined): string {
  const t = (name ?? "").replace(/[\u0000-\u001f\u007f]/g, "").trim().slice(0, 255);
  return t || "unnamed file";
}

/** 5000000000 → "5 GB" (SI units, as file managers show sizes). */
export function formatBytes(n: number): string {
  const [v, u] = n >= 1e9 ? [n / 1e9, "GB"] : n >= 1e6 ? [n / 1e6, "MB"] : n >= 1e3 ? [n / 1e3, "kB"] : [n, "bytes"];
  return `${v.toLocaleString("en-GB", { maximumFractionDigits: 1 })} ${u}`;
}

/** Bytes of request body held ahead of the file write (one PATCH part flows through this window). */
const BODY_WINDOW_BYTES = 4 << 20;

/**
 * The request body as a web stream with a byte-sized window. tus 2 reads every body as a web stream; the generic
 * Node-to-web adapter of Node.js 20 pauses the socket after every 64 KiB chunk, which cost about a tenth of the
 * upload speed in `npm run bench -- --only upload`. Here the socket keeps flowing until 4 MiB wait unwritten.
 * End, error and a dropped connection reach the web stream as the generic adapter passes them on.
 */
export function bodyStream(req: IncomingMessage): ReadableStream<Uint8Array<ArrayBuffer>> {
  return new ReadableStream<Uint8Array<ArrayBuffer>>(
    {
      start(controller) {
        req.on("data", (chunk: Buffer) => {
          controller.enqueue(new Uint8Array(chunk.buffer as ArrayBuffer, chunk.byteOffset, chunk.byteLength));
          if ((controller.desiredSize ?? 1) <= 0) req.pause();
        });
        finished(req, (err) => {
          if (err) controller.error(err);
          else controller.close();
        });
      },
      pull() {
        req.resume();
      },
      cancel(reason) {
        req.destroy(reason instanceof Error ? reason : undefined);
      },
    },
    new ByteLengthQueuingStrategy({ highWaterMark: BODY_WINDOW_BYTES }),
  );
}

/** srvx's Node request with the body above; everything else (headers, URL, abort signal) is srvx's own. */
class WindowedRequest extends NodeRequest {
  #body: ReadableStream<Uint8Array<ArrayBuffer>> | null | undefined;
  constructor(private readonly nodeReq: IncomingMessage, res: ServerResponse) {
    super({ req: nodeReq, res });
  }
  override get body(): ReadableStream<Uint8Array<ArrayBuffer>> | null {
    if (this.#body === undefined) this.#body = this.nodeReq.method === "PATCH" ? bodyStream(this.nodeReq) : super.body;
    return this.#body;
  }
}

export interface TusMount {
  handler: RequestHandler;
  store: HashingFileStore;
  server: Server;
  stop(): void;
}

/**
 * The resumable upload endpoint at /api/uploads. Every request (POST, PATCH, HEAD, DELETE) is authenticated in
 * onIncomingRequest: only contributors and curators of the dataset's project (or admins), and only the person who
 * started an upload may continue it. Ids are server-made UUIDs, so the client's file name never reaches a path.
 */
export function createTusMount(): TusMount {
  const store = new HashingFileStore({ directory: storageDir("tus"), expirationPeriodInMilliseconds: uploadConfig.UPLOAD_EXPIRY_HOURS * 3600_000 });
  const users = new WeakMap<object, SessionUser>();
  const limit = formatBytes(uploadConfig.UPLOAD_MAX_BYTES);

  const server = new Server({
    path: "/api/uploads",
    datastore: store,
    maxSize: uploadConfig.UPLOAD_MAX_BYTES,
    relativeLocation: true,
    namingFunction: () => randomUUID(),
    async onIncomingRequest(req, uploadId) {
      try {
        const user = await sessionUser(req);
        users.set(req, user);
        if (req.method === "POST") {
          const meta = parseMetadata(req.headers.get("upload-metadata"));
          const id = idSchema.safeParse(meta.datasetId);
          if (!id.success) throw refuse(400, "Say which dataset the file is for (upload metadata datasetId).");
          await assertCanUploadTo(user, id.data);
          return;
        }
        let upload: Upload;
        try {
          upload = await store.getUpload(uploadId);
        } catch {
          return; // tus answers 404/410 itself
        }
        if (upload.metadata?.uploaderId !== user.id) throw refuse(403, "This upload was started by someone else.");
        await assertCanUploadTo(user, upload.metadata?.datasetId ?? "");
      } catch (e) {
        fromAppError(e);
      }
    },
    async onUploadCreate(req, upload) {
      const user = users.get(req);
      if (!user) throw refuse(401, "Sign in to upload files.");
      if (upload.sizeIsDeferred || upload.size === undefined) throw refuse(400, "Send the file's size when the upload starts (Upload-Length).");
      if (upload.size === 0) throw refuse(400, "The file is empty (0 bytes). Choose the logger export that holds the data.");
      const meta = upload.metadata ?? {};
      return {
        metadata: {
          datasetId: meta.datasetId ?? "",
          originalName: cleanFileName(meta.filename ?? meta.name ?? undefined),
          uploaderId: user.id,
        },
      };
    },
    async onUploadFinish(req, upload) {
      const user = users.get(req);
      if (!user) throw refuse(401, "Sign in to upload files.");
      try {
        await recordFinishedUpload(store, user, upload);
      } catch (e) {
        fromAppError(e);
      }
      return {};
    },
    onResponseError(_req, err) {
      const code = (err as { status_code?: number }).status_code;
      if (code === 413) return refuse(413, `The file is larger than the upload limit of ${limit}.`);
      return undefined;
    },
  });
  server.on(EVENTS.POST_TERMINATE, (_req, _res, id) => store.forget(id));

  const sweep = () => {
    server.cleanUpExpiredUploads().then(
      (n) => n && logger.info(`removed ${n} expired unfinished upload(s)`),
      (err) => logger.warn({ err }, "expired upload clean-up failed"),
    );
  };
  const timer = setInterval(sweep, uploadConfig.UPLOAD_CLEANUP_INTERVAL_S * 1000);
  timer.unref();

  // GET /api/uploads/:id is the JSON detail route (server/routes/uploads.ts), not a tus download.
  const handler: RequestHandler = (req, res, next) => {
    if (req.method === "GET") return next();
    void server.handleWeb(new WindowedRequest(req, res)).then((response) => sendNodeResponse(res, response), next);
  };
  return { handler, store, server, stop: () => clearInterval(timer) };
}

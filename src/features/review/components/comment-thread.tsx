import { useState } from "react";
import { ApiError, getErrorMessage } from "@/lib/api-client";
import { Alert } from "@/components/ui/alert";
import { Button } from "@/components/ui/button";
import { TextareaField } from "@/components/ui/field";
import { Loading } from "@/components/ui/loading";
import { UtcTime } from "@/components/ui/utc-time";
import { useAddComment, useComments } from "../api/comments";

/** The discussion on a version, oldest first; any project member can add to it. */
export function CommentThread({ versionId, canComment }: { versionId: string; canComment: boolean }) {
  const { data, isPending, error } = useComments(versionId);
  const add = useAddComment(versionId);
  const [body, setBody] = useState("");
  const [fieldError, setFieldError] = useState<string>();

  return (
    <div className="space-y-4">
      {isPending ? (
        <Loading label="Loading comments…" />
      ) : error ? (
        <Alert tone="attention" title="Comments could not be loaded">
          {getErrorMessage(error)}
        </Alert>
      ) : data.items.length === 0 ? (
        <p className="text-muted">No comments yet. Ask about a stretch or a setting here; the uploader sees it in their notices.</p>
      ) : (
        <ol className="space-y-3" aria-label="Comments">
          {data.items.map((c) => (
            <li key={c.id} className="rounded-md border border-line bg-surface px-4 py-3">
              <div className="mb-1 flex flex-wrap items-baseline gap-x-2 text-sm">
                <span className="font-semibold">{c.authorName}</span>
                <span className="text-muted">
                  <UtcTime iso={c.createdAt} />
                </span>
              </div>
              <p className="whitespace-pre-line">{c.body}</p>
            </li>
          ))}
        </ol>
      )}
      {canComment ? (
        <form
          className="space-y-2"
          onSubmit={(e) => {
            e.preventDefault();
            if (!body.trim()) {
              setFieldError("Write a comment");
              return;
            }
            add.mutate(body, {
              onSuccess: () => {
                setBody("");
                setFieldError(undefined);
              },
              onError: (err) => setFieldError(err instanceof ApiError && err.fields.body ? err.fields.body[0] : getErrorMessage(err)),
            });
          }}
        >
          <TextareaField label="Add a comment" value={body} onChange={(e) => setBody(e.target.value)} rows={3} error={fieldError} maxLength={8000} />
          <Button type="submit" variant="secondary" busy={add.isPending} disabled={add.isPending}>
            Post comment
          </Button>
        </form>
      ) : null}
    </div>
  );
}

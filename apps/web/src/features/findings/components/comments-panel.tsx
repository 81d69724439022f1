import { CreateCommentRequest, type FindingRow } from '@earmark/contracts';
import { useId, useState, type FormEvent } from 'react';
import { Button } from '@/components/button';
import { Dialog } from '@/components/dialog';
import { ErrorState } from '@/components/error-state';
import { TextArea } from '@/components/form-controls';
import { InlineError } from '@/components/inline-error';
import { RelativeTime } from '@/components/relative-time';
import { Skeleton } from '@/components/skeleton';
import { useAddComment } from '../api/add-comment';
import { useComments } from '../api/get-comments';

function AddCommentForm({ projectKey, findingId }: { projectKey: string; findingId: string }) {
  const fieldId = useId();
  const [body, setBody] = useState('');
  const [problem, setProblem] = useState<string | null>(null);
  const add = useAddComment(projectKey, findingId);

  const onSubmit = (event: FormEvent) => {
    event.preventDefault();
    const parsed = CreateCommentRequest.safeParse({ body });
    if (!parsed.success) {
      setProblem('Write something first.');
      return;
    }
    setProblem(null);
    add.mutate(parsed.data, { onSuccess: () => setBody('') });
  };

  return (
    <form onSubmit={onSubmit} className="space-y-2 border-t border-line pt-4" noValidate>
      <label htmlFor={fieldId} className="block text-sm font-medium text-ink-800">
        Comment
      </label>
      <TextArea
        id={fieldId}
        value={body}
        onChange={(event) => setBody(event.target.value)}
        placeholder="What did you find? Link the commit if there is one."
        aria-invalid={problem ? true : undefined}
        onKeyDown={(event) => {
          // Ctrl/⌘+Enter sends, as in most review tools.
          if (event.key === 'Enter' && (event.metaKey || event.ctrlKey)) onSubmit(event);
        }}
      />
      {problem ? <p className="text-[13px] text-fail">{problem}</p> : null}
      {add.error ? <InlineError error={add.error} /> : null}
      <div className="flex justify-end">
        <Button type="submit" busy={add.isPending}>
          Add comment
        </Button>
      </div>
    </form>
  );
}

/** A side panel with a finding's discussion, oldest first, and a box to add to it. */
export function CommentsPanel({
  projectKey,
  finding,
  canComment,
  onClose,
}: {
  projectKey: string;
  finding: FindingRow | null;
  canComment: boolean;
  onClose: () => void;
}) {
  const comments = useComments(projectKey, finding?.id ?? null);
  return (
    <Dialog
      open={finding !== null}
      onClose={onClose}
      variant="side"
      title="Comments"
      description={finding ? finding.title : undefined}
    >
      {finding ? (
        <div className="space-y-4">
          {comments.isPending ? (
            <div className="space-y-3" aria-busy="true">
              <Skeleton className="h-14" />
              <Skeleton className="h-14" />
            </div>
          ) : comments.isError ? (
            <ErrorState error={comments.error} onRetry={() => void comments.refetch()} />
          ) : comments.data.length === 0 ? (
            <p className="text-sm text-ink-500">No comments yet.</p>
          ) : (
            <ol className="space-y-3" aria-label="Comments">
              {comments.data.map((comment) => (
                <li key={comment.id} className="rounded-md border border-line bg-paper px-3 py-2.5">
                  <p className="flex items-baseline justify-between gap-3 text-xs text-ink-500">
                    <span className="font-semibold text-ink-800">{comment.author.displayName}</span>
                    <RelativeTime iso={comment.createdAt} />
                  </p>
                  <p className="mt-1 text-sm whitespace-pre-wrap text-ink-900">{comment.body}</p>
                </li>
              ))}
            </ol>
          )}
          {canComment ? (
            <AddCommentForm key={finding.id} projectKey={projectKey} findingId={finding.id} />
          ) : (
            <p className="border-t border-line pt-4 text-sm text-ink-500">
              Viewers can read the discussion; engineers and QA managers can add to it.
            </p>
          )}
        </div>
      ) : null}
    </Dialog>
  );
}

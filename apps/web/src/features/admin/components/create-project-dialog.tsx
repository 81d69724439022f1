import { CreateProjectRequest } from '@earmark/contracts';
import { useId, useState, type FormEvent } from 'react';
import { useNavigate } from 'react-router';
import { Button } from '@/components/button';
import { Dialog } from '@/components/dialog';
import { TextInput } from '@/components/form-controls';
import { InlineError } from '@/components/inline-error';
import { notify } from '@/components/toast';
import { paths } from '@/lib/paths';
import { useCreateProject } from '../api/admin-projects';

/** A new project: its key (used in URLs and by CI) and its name; members are added next. */
export function CreateProjectDialog({ open, onClose }: { open: boolean; onClose: () => void }) {
  const ids = { key: useId(), name: useId() };
  const [key, setKey] = useState('');
  const [name, setName] = useState('');
  const [problem, setProblem] = useState<{ key?: string; name?: string }>({});
  const create = useCreateProject();
  const navigate = useNavigate();

  const close = () => {
    create.reset();
    setKey('');
    setName('');
    setProblem({});
    onClose();
  };

  const onSubmit = (event: FormEvent) => {
    event.preventDefault();
    const parsed = CreateProjectRequest.safeParse({ key: key.trim(), name: name.trim() });
    if (!parsed.success) {
      const byField = new Map(parsed.error.issues.map((issue) => [issue.path[0], issue.message]));
      setProblem({
        key: byField.has('key') ? `Key: 2–40 characters; ${byField.get('key')?.includes('lower-case') ? byField.get('key') : 'lower-case letters, digits and dashes, starting with a letter'}.` : undefined,
        name: byField.has('name') ? 'Give the project a name (up to 120 characters).' : undefined,
      });
      return;
    }
    setProblem({});
    create.mutate(parsed.data, {
      onSuccess: (project) => {
        notify.success(`Project ${project.key} created`, 'Add its members next.');
        close();
        void navigate(paths.members(project.key));
      },
      onError: () => notify.error('The project was not created', 'See the dialog for the reason.'),
    });
  };

  return (
    <Dialog
      open={open}
      onClose={close}
      title="Create a project"
      description="One firmware product line. The key appears in URLs and in CI configuration and cannot change later."
      footer={
        <>
          <Button variant="secondary" onClick={close}>
            Cancel
          </Button>
          <Button type="submit" form="create-project-form" busy={create.isPending}>
            Create project
          </Button>
        </>
      }
    >
      <form id="create-project-form" noValidate onSubmit={onSubmit} className="space-y-4">
        <div>
          <label htmlFor={ids.key} className="mb-1.5 block text-sm font-medium text-ink-800">
            Key
          </label>
          <TextInput
            id={ids.key}
            value={key}
            data-autofocus=""
            maxLength={40}
            placeholder="e.g. wren-speaker"
            aria-invalid={problem.key ? true : undefined}
            onChange={(event) => setKey(event.target.value)}
            className="w-full font-mono"
          />
          {problem.key ? <p className="mt-1.5 text-[13px] text-fail">{problem.key}</p> : null}
        </div>
        <div>
          <label htmlFor={ids.name} className="mb-1.5 block text-sm font-medium text-ink-800">
            Name
          </label>
          <TextInput id={ids.name} value={name} maxLength={120} aria-invalid={problem.name ? true : undefined} onChange={(event) => setName(event.target.value)} className="w-full" />
          {problem.name ? <p className="mt-1.5 text-[13px] text-fail">{problem.name}</p> : null}
        </div>
        {create.error ? <InlineError error={create.error} /> : null}
      </form>
    </Dialog>
  );
}

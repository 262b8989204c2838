import { useState } from 'react';
import { useNavigate } from 'react-router';
import { projectUpdateBodySchema, type Project } from '@contracts/api';
import { Button } from '../../components/Button';
import { FormAlert, TextAreaField, TextField } from '../../components/Form';
import { Panel } from '../../components/Panel';
import { VersionedFormActions, useVersionedForm } from '../../components/VersionedForm';
import { formErrorsFromError } from '../../lib/formErrors';
import { useDeleteProject } from './deleteProject';
import { useUpdateProject } from './updateProject';

const FIELDS = ['name', 'description'] as const;

/**
 * The form keeps the version it was opened with: after a 409 the cached project refreshes
 * underneath, but a second click must not silently overwrite the other person's change.
 * The parent remounts the form (new key) to start again from the server's latest values.
 */
function RenameForm({ project, onSaved, onLoadLatest }: { project: Project; onSaved: () => void; onLoadLatest: () => void }) {
  const update = useUpdateProject(project.id);
  const { errors, formRef, stale, onSubmit } = useVersionedForm({
    version: project.version,
    schema: projectUpdateBodySchema,
    fields: FIELDS,
    conflictMessage: 'Someone else changed this project since you opened it. Your edits are still in the form; load the latest to see theirs before saving again.',
    save: update.mutate,
    // The hook's own onSettled has refetched the project by now, so a remount sees the new version.
    onSaved,
  });

  return (
    <form ref={formRef} noValidate onSubmit={onSubmit} className="space-y-3" aria-label="Rename project">
      <FormAlert message={errors.form} />
      <TextField label="Project name" name="name" required limit={120} defaultValue={project.name} error={errors.fields.name} />
      <TextAreaField label="Description" name="description" limit={2000} defaultValue={project.description} error={errors.fields.description} />
      <VersionedFormActions pending={update.isPending} stale={stale} onLoadLatest={onLoadLatest}>
        Save changes
      </VersionedFormActions>
    </form>
  );
}

function DeleteProject({ project }: { project: Project }) {
  const del = useDeleteProject(project.id);
  const navigate = useNavigate();
  const [open, setOpen] = useState(false);
  const [typed, setTyped] = useState('');
  const [error, setError] = useState<string | null>(null);
  if (!open) {
    return (
      <Button variant="danger" onClick={() => setOpen(true)}>
        Delete project…
      </Button>
    );
  }
  return (
    <form
      className="space-y-3 rounded-md border border-garnet-300 bg-garnet-50 p-3"
      aria-label="Delete project"
      onSubmit={(e) => {
        e.preventDefault();
        setError(null);
        del.mutate(undefined, { onSuccess: () => navigate('/projects', { replace: true }), onError: (err) => setError(formErrorsFromError(err, []).form) });
      }}
    >
      <p className="text-note text-garnet-700">This removes the project, its designs and its team for everyone. Type the project name to confirm.</p>
      <FormAlert message={error} />
      <TextField label="Project name" name="confirmName" value={typed} onChange={(e) => setTyped(e.target.value)} autoComplete="off" />
      <div className="flex gap-2">
        <button
          type="submit"
          disabled={typed !== project.name || del.isPending}
          className="rounded-md bg-garnet-700 px-4 py-2 text-note font-semibold text-white disabled:cursor-not-allowed disabled:opacity-50 focus-visible:outline-2 focus-visible:outline-offset-2 focus-visible:outline-garnet-600"
        >
          {del.isPending ? 'Deleting…' : 'Delete for everyone'}
        </button>
        <Button variant="secondary" onClick={() => { setOpen(false); setTyped(''); }}>
          Cancel
        </Button>
      </div>
    </form>
  );
}

export function ProjectSettings({ project }: { project: Project }) {
  const canRename = project.capabilities.includes('project.rename');
  const canDelete = project.capabilities.includes('project.delete');
  const [formKey, setFormKey] = useState(0);
  const [saved, setSaved] = useState(false);
  if (!canRename && !canDelete) return null;
  return (
    <Panel title="Project settings">
      <div className="space-y-6">
        {canRename && (
          <div className="space-y-3">
            <FormAlert tone="success" message={saved ? 'Saved.' : null} />
            <RenameForm
              key={formKey}
              project={project}
              onSaved={() => {
                setSaved(true);
                setFormKey((k) => k + 1);
              }}
              onLoadLatest={() => {
                setSaved(false);
                setFormKey((k) => k + 1);
              }}
            />
          </div>
        )}
        {canDelete && <DeleteProject project={project} />}
      </div>
    </Panel>
  );
}

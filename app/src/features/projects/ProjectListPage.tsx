import { Link, useNavigate } from 'react-router';
import { projectCreateBodySchema } from '@contracts/api';
import { FormAlert, SubmitButton, TextAreaField, TextField, formValues, useFormErrors } from '../../components/Form';
import { PageHeader } from '../../components/PageHeader';
import { usePageTitle } from '../../components/pageTitle';
import { Panel } from '../../components/Panel';
import { Loading, QueryError } from '../../components/QueryState';
import { RoleBadge } from '../../components/RoleBadge';
import { formatDateTime } from '../../lib/format';
import { formErrorsFromError, validateWith } from '../../lib/formErrors';
import { useCreateProject } from './createProject';
import { useProjects } from './listProjects';

const FIELDS = ['name', 'description'] as const;

function CreateProjectForm() {
  const create = useCreateProject();
  const navigate = useNavigate();
  const { errors, setErrors, clearErrors, formRef } = useFormErrors();

  function onSubmit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = e.currentTarget;
    const checked = validateWith(projectCreateBodySchema, formValues(form), FIELDS);
    if (!checked.ok) return setErrors(checked.errors);
    clearErrors();
    create.mutate(checked.data, {
      onSuccess: (project) => {
        form.reset();
        navigate(`/projects/${project.id}`);
      },
      onError: (err) => setErrors(formErrorsFromError(err, FIELDS)),
    });
  }

  return (
    <form ref={formRef} noValidate onSubmit={onSubmit} className="space-y-4" aria-label="Start a project">
      <FormAlert message={errors.form} />
      <TextField label="Project name" name="name" required limit={120} error={errors.fields.name} hint="For example: the array, sample or question it studies." />
      <TextAreaField label="Description" name="description" limit={2000} error={errors.fields.description} hint="Optional. What the team is modelling and why." />
      <SubmitButton pending={create.isPending} pendingLabel="Creating…">
        Create project
      </SubmitButton>
    </form>
  );
}

export function ProjectListPage() {
  const projects = useProjects();
  usePageTitle('Projects');
  return (
    <>
      <PageHeader title="Projects" lead="Each project holds its dopant-array designs, the people who work on them and a log of what they did." />
      <div className="grid gap-x-10 gap-y-8 lg:grid-cols-3">
        <div className="min-w-0 lg:col-span-2">
          <Panel title="Your projects">
            {projects.isPending && <Loading label="Loading projects…" />}
            {projects.isError && <QueryError error={projects.error} what="your projects" onRetry={() => void projects.refetch()} />}
            {projects.data && projects.data.length === 0 && (
              <p className="py-4 text-body text-wafer-600">No projects yet. Start one with the form beside this list, or ask a colleague to invite you to theirs.</p>
            )}
            {projects.data && projects.data.length > 0 && (
              <ul className="divide-y divide-wafer-100" aria-label="Projects">
                {projects.data.map((p) => (
                  <li key={p.id} className="flex items-start justify-between gap-3 py-3">
                    <div className="min-w-0 flex-1">
                      <Link to={`/projects/${p.id}`} className="wrap-anywhere text-body font-bold text-wafer-900 underline-offset-2 hover:text-phosphor-700 hover:underline">
                        {p.name}
                      </Link>
                      {p.description && <p className="mt-0.5 line-clamp-2 wrap-anywhere text-note text-wafer-600">{p.description}</p>}
                      <p className="mt-1 text-fine text-wafer-500">
                        Updated <time dateTime={p.updatedAt}>{formatDateTime(p.updatedAt)}</time>
                      </p>
                    </div>
                    <RoleBadge role={p.role} />
                  </li>
                ))}
              </ul>
            )}
          </Panel>
        </div>
        <Panel title="Start a project" description="You become its owner and can invite your team.">
          <CreateProjectForm />
        </Panel>
      </div>
    </>
  );
}

// POST /api/projects: create a project; the creator becomes its owner.
import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { z } from 'zod';
import { projectSchema, type projectCreateBodySchema } from '@contracts/api';
import { api, bareOrWrapped } from '../../lib/api';
import { projectsQuery } from './listProjects';

export type ProjectCreateBody = z.input<typeof projectCreateBodySchema>;

const createdAnswer = bareOrWrapped('project', projectSchema);

export function createProject(body: ProjectCreateBody) {
  return api('/api/projects', { method: 'POST', body }, createdAnswer);
}

export function useCreateProject() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: createProject,
    onSuccess: () => qc.invalidateQueries({ queryKey: projectsQuery().queryKey }),
  });
}

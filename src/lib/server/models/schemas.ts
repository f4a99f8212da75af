import { z } from 'zod';

const tag = z.string().trim().min(1, 'must not be empty').max(40, 'at most 40 characters');

export const modelMetaSchema = z.object({
  name: z.string().trim().min(1, 'must not be empty').max(200, 'at most 200 characters'),
  description: z.string().max(5000, 'at most 5000 characters').default(''),
  tags: z.array(tag).max(20, 'at most 20 tags').default([]),
}).strict();

export const createModelSchema = modelMetaSchema.extend({
  document: z.record(z.unknown()),
  changeNote: z.string().trim().max(1000, 'at most 1000 characters').default('first version'),
}).strict();

export const updateModelSchema = z.object({
  name: modelMetaSchema.shape.name.optional(),
  description: z.string().max(5000, 'at most 5000 characters').optional(),
  tags: z.array(tag).max(20, 'at most 20 tags').optional(),
}).strict();

export const newVersionSchema = z.object({
  document: z.record(z.unknown()),
  changeNote: z.string().trim().min(1, 'say what changed').max(1000, 'at most 1000 characters'),
  /** Optimistic check: the version the edit started from; a newer one makes the request a conflict. */
  baseVersion: z.number().int().positive().optional(),
}).strict();

export const archiveSchema = z.object({ archived: z.boolean() }).strict();

export const listModelsQuerySchema = z.object({
  q: z.string().max(200).optional(),
  tag: z.string().max(40).optional(),
  sort: z.enum(['name', 'created', 'updated']).default('updated'),
  order: z.enum(['asc', 'desc']).optional(),
  page: z.coerce.number().int().min(1).max(100000).default(1),
  pageSize: z.coerce.number().int().min(1).max(100).default(20),
  archived: z.enum(['exclude', 'include', 'only']).default('exclude'),
}).strict();

export type ListModelsQuery = z.infer<typeof listModelsQuerySchema>;

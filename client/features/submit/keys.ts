/** Query keys of stored walks, apart from the query so the shell can use them without the walk schema. */
export const walkKeys = {
  all: ['walks'] as const,
  detail: (id: string) => [...walkKeys.all, id] as const,
};

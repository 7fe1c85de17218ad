import type { UserRecord } from '../../../../shared/admin';
import type { CategorySummary } from '../../../../shared/auth';
import { errorMessage } from '../../../components/ui/status';
import { useSetOwners } from '../api/set-owners';

/** Which category managers own which categories; a tick adds or removes one owner. */
export function OwnershipPanel({
  categories,
  users,
}: {
  categories: CategorySummary[];
  users: UserRecord[];
}) {
  const setOwners = useSetOwners();
  const managers = users.filter((u) => u.role === 'manager' && u.active);

  const toggle = (category: CategorySummary, userId: number, owned: boolean) => {
    const current = category.owners.map((o) => o.id);
    const userIds = owned ? current.filter((id) => id !== userId) : [...current, userId];
    setOwners.mutate({ slug: category.slug, userIds });
  };

  if (managers.length === 0) {
    return (
      <p className="text-sm text-ink-500">Give someone the category manager role to assign categories.</p>
    );
  }
  return (
    <div className="overflow-x-auto rounded-lg border border-ink-100 bg-white">
      <table className="w-full text-sm">
        <caption className="sr-only">Category ownership</caption>
        <thead className="bg-ink-50 text-left text-ink-700">
          <tr>
            <th scope="col" className="px-4 py-2">
              Category
            </th>
            {managers.map((m) => (
              <th key={m.id} scope="col" className="px-4 py-2">
                {m.name}
              </th>
            ))}
          </tr>
        </thead>
        <tbody>
          {categories.map((category) => (
            <tr key={category.id} className="border-t border-ink-100">
              <th scope="row" className="px-4 py-2 text-left font-medium">
                {category.name}
              </th>
              {managers.map((m) => {
                const owned = category.owners.some((o) => o.id === m.id);
                return (
                  <td key={m.id} className="px-4 py-2">
                    <input
                      type="checkbox"
                      checked={owned}
                      disabled={setOwners.isPending}
                      aria-label={`${m.name} owns ${category.name}`}
                      onChange={() => toggle(category, m.id, owned)}
                    />
                  </td>
                );
              })}
            </tr>
          ))}
        </tbody>
      </table>
      {setOwners.error ? (
        <p role="alert" className="px-4 py-2 text-sm text-coral-500">
          {errorMessage(setOwners.error)}
        </p>
      ) : null}
    </div>
  );
}

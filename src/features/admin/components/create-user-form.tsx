import { zodResolver } from '@hookform/resolvers/zod';
import { useForm } from 'react-hook-form';
import { createUserSchema, type CreateUserInput } from '../../../../shared/admin';
import { roleCodes, roleLabels } from '../../../../shared/auth';
import { Button } from '../../../components/ui/button';
import { errorMessage } from '../../../components/ui/status';
import { useCreateUser } from '../api/create-user';

const field = 'mt-1 w-full rounded-md border border-ink-200 bg-white px-3 py-2 text-sm';

export function CreateUserForm() {
  const createUser = useCreateUser();
  const {
    register,
    handleSubmit,
    reset,
    formState: { errors },
  } = useForm<CreateUserInput>({
    resolver: zodResolver(createUserSchema),
    defaultValues: { email: '', name: '', role: 'analyst', password: '' },
  });
  const onSubmit = handleSubmit((values) => createUser.mutate(values, { onSuccess: () => reset() }));

  return (
    <form
      onSubmit={onSubmit}
      noValidate
      aria-label="Add a person"
      className="grid gap-3 rounded-lg border border-ink-100 bg-white p-5 sm:grid-cols-2 lg:grid-cols-5"
    >
      {(
        [
          ['name', 'Name', 'text'],
          ['email', 'E-mail', 'email'],
          ['password', 'First password', 'password'],
        ] as const
      ).map(([name, label, type]) => (
        <div key={name}>
          <label htmlFor={`new-${name}`} className="text-sm font-semibold text-ink-800">
            {label}
          </label>
          <input
            id={`new-${name}`}
            type={type}
            autoComplete="off"
            className={field}
            aria-invalid={errors[name] ? true : undefined}
            {...register(name)}
          />
          {errors[name] ? <p className="mt-1 text-xs text-coral-500">{errors[name]?.message}</p> : null}
        </div>
      ))}
      <div>
        <label htmlFor="new-role" className="text-sm font-semibold text-ink-800">
          Role
        </label>
        <select id="new-role" className={field} {...register('role')}>
          {roleCodes.map((role) => (
            <option key={role} value={role}>
              {roleLabels[role]}
            </option>
          ))}
        </select>
      </div>
      <div className="flex items-end">
        <Button type="submit" disabled={createUser.isPending} className="w-full">
          Add person
        </Button>
      </div>
      {createUser.error ? (
        <p role="alert" className="text-sm text-coral-500 sm:col-span-2 lg:col-span-5">
          {errorMessage(createUser.error)}
        </p>
      ) : null}
      {createUser.isSuccess ? (
        <p role="status" className="text-sm text-kelp-500 sm:col-span-2 lg:col-span-5">
          {createUser.data.name} can now sign in.
        </p>
      ) : null}
    </form>
  );
}

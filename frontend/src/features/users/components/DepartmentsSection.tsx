import { useId, useState } from 'react';
import { useForm, type UseFormRegisterReturn } from 'react-hook-form';
import Alert from '@mui/material/Alert';
import Box from '@mui/material/Box';
import Button from '@mui/material/Button';
import Paper from '@mui/material/Paper';
import Stack from '@mui/material/Stack';
import Table from '@mui/material/Table';
import TableBody from '@mui/material/TableBody';
import TableCell from '@mui/material/TableCell';
import TableHead from '@mui/material/TableHead';
import TableRow from '@mui/material/TableRow';
import TextField from '@mui/material/TextField';
import Typography from '@mui/material/Typography';
import { DEPARTMENT_CODE_PATTERN } from '@kinpath/contracts';
import { apiMessage } from '../../../lib/api-client';
import { fieldProps } from '../../../lib/form';
import { useAddDepartment, useDepartments, useRemoveDepartment } from '../api/users';

/** An optional field: the ref goes to the input itself, and nothing marks it required. */
function optional({ ref, ...rest }: UseFormRegisterReturn) {
  return { ...rest, inputRef: ref };
}

interface DepartmentFields {
  code: string;
  name: string;
}

/** The list heads are scoped from: the catalogue's departments, plus any an admin adds ahead of it. */
export function DepartmentsSection() {
  const headingId = useId();
  const departments = useDepartments();
  const add = useAddDepartment();
  const remove = useRemoveDepartment();
  const [done, setDone] = useState<string | null>(null);
  const {
    register,
    handleSubmit,
    reset,
    formState: { errors },
  } = useForm<DepartmentFields>({ defaultValues: { code: '', name: '' } });

  const onSubmit = handleSubmit(async (values) => {
    setDone(null);
    remove.reset();
    try {
      const added = await add.mutateAsync({
        code: values.code.trim().toUpperCase(),
        ...(values.name.trim() ? { name: values.name.trim() } : {}),
      });
      setDone(`${added.code} added to the departments.`);
      reset();
    } catch {
      // Shown below.
    }
  });

  const failure = add.isError ? add.error : remove.isError ? remove.error : null;

  return (
    <Paper component="section" aria-labelledby={headingId} variant="outlined" sx={{ p: 2.5 }}>
      <Typography id={headingId} variant="h2" sx={{ mb: 0.5 }}>
        Departments
      </Typography>
      <Typography sx={{ mb: 2, color: 'text.secondary' }}>
        A head is scoped to one of these. The catalogue’s departments are listed from its courses;
        add a department here before its courses are imported.
      </Typography>
      {departments.isPending ? (
        <Typography role="status">Loading departments…</Typography>
      ) : departments.isError ? (
        <Alert severity="error" role="alert">
          The departments could not be loaded. Reload the page to try again.
        </Alert>
      ) : (
        <Box sx={{ overflowX: 'auto', mb: 2 }}>
          <Table size="small" aria-labelledby={headingId}>
            <TableHead>
              <TableRow>
                <TableCell>Code</TableCell>
                <TableCell align="right">Courses</TableCell>
                <TableCell align="right">Heads</TableCell>
                <TableCell>Source</TableCell>
              </TableRow>
            </TableHead>
            <TableBody>
              {departments.data.map((d) => (
                <TableRow key={d.code}>
                  <TableCell>{d.name ? `${d.code} — ${d.name}` : d.code}</TableCell>
                  <TableCell align="right" className="kp-figures">
                    {d.courses}
                  </TableCell>
                  <TableCell align="right" className="kp-figures">
                    {d.heads}
                  </TableCell>
                  <TableCell>
                    {!d.added ? (
                      'Catalogue'
                    ) : d.courses === 0 && d.heads === 0 ? (
                      <Button
                        size="small"
                        onClick={() => {
                          setDone(null);
                          add.reset();
                          remove.mutate(d.code, {
                            onSuccess: () => setDone(`${d.code} removed from the departments.`),
                          });
                        }}
                        aria-label={`Remove department ${d.code}`}
                      >
                        Remove
                      </Button>
                    ) : (
                      'Added by an admin'
                    )}
                  </TableCell>
                </TableRow>
              ))}
            </TableBody>
          </Table>
        </Box>
      )}
      <form onSubmit={onSubmit} noValidate aria-label="Add a department">
        <Stack spacing={1.5}>
          {done ? (
            <Alert severity="success" role="status">
              {done}
            </Alert>
          ) : null}
          {failure ? (
            <Alert severity="error" role="alert">
              {apiMessage(failure) ?? 'The departments could not be changed. Try again.'}
            </Alert>
          ) : null}
          <TextField
            label="New department code"
            autoComplete="off"
            {...fieldProps(
              register('code', {
                validate: (value) =>
                  DEPARTMENT_CODE_PATTERN.test(value.trim().toUpperCase())
                    ? true
                    : 'Use 2 to 6 letters, such as MUS.',
              }),
              errors.code?.message,
            )}
          />
          <TextField label="Name (optional)" autoComplete="off" {...optional(register('name'))} />
          <Box>
            <Button type="submit" variant="outlined" loading={add.isPending}>
              Add department
            </Button>
          </Box>
        </Stack>
      </form>
    </Paper>
  );
}

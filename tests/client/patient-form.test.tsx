// @vitest-environment happy-dom
import { afterEach, describe, expect, it, vi } from 'vitest';
import { cleanup, fireEvent, render, screen, waitFor } from '@testing-library/react';
import { PatientForm } from '../../src/features/patients/components/patient-form';
import { ApiError } from '../../src/lib/api-client';

afterEach(cleanup);

const fill = (label: string, value: string) => fireEvent.change(screen.getByLabelText(label), { target: { value } });

describe('PatientForm', () => {
  it('shows field errors from the shared schema and does not submit', async () => {
    const onSubmit = vi.fn();
    render(<PatientForm submitLabel="Create patient" onSubmit={onSubmit} />);
    fill('Date of birth', '2999-01-01');
    fireEvent.click(screen.getByRole('button', { name: 'Create patient' }));
    expect(await screen.findByText('Enter a first name.')).toBeTruthy();
    expect(screen.getByText('Date of birth cannot be in the future.')).toBeTruthy();
    expect(screen.getByLabelText('First name').getAttribute('aria-invalid')).toBe('true');
    expect(onSubmit).not.toHaveBeenCalled();
  });

  it('submits clean values and shows a server field error beside its field', async () => {
    const onSubmit = vi.fn().mockRejectedValue(new ApiError(400, 'VALIDATION_FAILED', 'email: taken', [{ path: 'email', message: 'This e-mail is already on another record.' }]));
    render(<PatientForm submitLabel="Create patient" onSubmit={onSubmit} />);
    fill('First name', ' Wren ');
    fill('Last name', 'Halloran');
    fill('Date of birth', '1992-04-03');
    fill('E-mail', 'wren@mail.example');
    fireEvent.click(screen.getByRole('button', { name: 'Create patient' }));
    await waitFor(() => expect(onSubmit).toHaveBeenCalledTimes(1));
    expect(onSubmit.mock.calls[0][0]).toMatchObject({ firstName: 'Wren', lastName: 'Halloran', dateOfBirth: '1992-04-03', email: 'wren@mail.example' });
    expect(await screen.findByText('This e-mail is already on another record.')).toBeTruthy();
  });
});

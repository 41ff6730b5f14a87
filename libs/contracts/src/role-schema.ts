import { z } from 'zod';
import { ROLES } from './roles';

export const roleSchema = z.enum(ROLES);

import type { DepartmentEntry } from '@kinpath/contracts';
import { unknownDepartmentMessage } from '@kinpath/contracts';
import {
  BadRequestException,
  ConflictException,
  Injectable,
  NotFoundException,
} from '@nestjs/common';
import { InjectRepository } from '@nestjs/typeorm';
import type { EntityManager, Repository } from 'typeorm';
import { AUDIT_ACTIONS } from '../audit/audit-actions';
import { AuditService } from '../audit/audit.service';
import { Course } from '../term-data/entities/course.entity';
import type { User } from '../users/entities/user.entity';
import type { AddDepartmentDto } from './dto/add-department.dto';
import { Department } from './entities/department.entity';

/** The departments a head may be scoped to: the catalogue's, and those an admin added. */
@Injectable()
export class DepartmentsService {
  constructor(
    @InjectRepository(Department) private readonly departments: Repository<Department>,
    private readonly audit: AuditService,
  ) {}

  async list(manager: EntityManager = this.departments.manager): Promise<DepartmentEntry[]> {
    const [courses, added, heads] = await Promise.all([
      manager
        .getRepository(Course)
        .createQueryBuilder('c')
        .select('c.department', 'code')
        .addSelect('count(*)', 'n')
        .groupBy('c.department')
        .getRawMany<{ code: string; n: string }>(),
      manager.getRepository(Department).find(),
      manager
        .createQueryBuilder()
        .select('u.department', 'code')
        .addSelect('count(*)', 'n')
        .from('users', 'u')
        .where(`u.role = 'department_head'`)
        .groupBy('u.department')
        .getRawMany<{ code: string; n: string }>(),
    ]);
    const byCode = new Map<string, DepartmentEntry>();
    const entry = (code: string) => {
      let found = byCode.get(code);
      if (!found) {
        found = { code, name: null, courses: 0, added: false, heads: 0 };
        byCode.set(code, found);
      }
      return found;
    };
    for (const row of courses) entry(row.code).courses = Number(row.n);
    for (const row of added) Object.assign(entry(row.code), { name: row.name, added: true });
    // Heads count only on a listed department; a code on no list is not offered.
    for (const row of heads) {
      const listed = byCode.get(row.code);
      if (listed) listed.heads = Number(row.n);
    }
    return [...byCode.values()].sort((a, b) => a.code.localeCompare(b.code));
  }

  /** Refuses a code no list holds with a 400 that names the way out. */
  async assertKnown(code: string, manager: EntityManager = this.departments.manager) {
    const known =
      (await manager.getRepository(Course).existsBy({ department: code })) ||
      (await manager.getRepository(Department).existsBy({ code }));
    if (!known) throw new BadRequestException(unknownDepartmentMessage(code));
  }

  async add(actor: User, dto: AddDepartmentDto): Promise<DepartmentEntry> {
    const name = dto.name?.trim() || null;
    return this.departments.manager.transaction(async (manager) => {
      const listed = (await this.list(manager)).find((d) => d.code === dto.code);
      if (listed) throw new ConflictException(`${dto.code} is on the list already.`);
      await manager.getRepository(Department).insert({ code: dto.code, name });
      await this.audit.record(
        {
          actor,
          action: AUDIT_ACTIONS.departmentAdded,
          target: dto.code,
          detail: { code: dto.code, name },
        },
        manager,
      );
      return { code: dto.code, name, courses: 0, added: true, heads: 0 };
    });
  }

  async remove(actor: User, code: string): Promise<void> {
    await this.departments.manager.transaction(async (manager) => {
      const listed = (await this.list(manager)).find((d) => d.code === code);
      if (!listed?.added)
        throw new NotFoundException(`${code} is not a department an admin added.`);
      if (listed.courses > 0 || listed.heads > 0) {
        throw new ConflictException(
          `${code} is still in use (${listed.courses} courses, ${listed.heads} heads) and stays on the list.`,
        );
      }
      await manager.getRepository(Department).delete({ code });
      await this.audit.record(
        { actor, action: AUDIT_ACTIONS.departmentRemoved, target: code, detail: { code } },
        manager,
      );
    });
  }
}

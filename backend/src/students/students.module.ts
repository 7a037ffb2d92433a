import { Module } from '@nestjs/common';
import { MailModule } from '../mail/mail.module';
import { ModelModule } from '../model/model.module';
import { PseudonymModule } from '../pseudonym/pseudonym.module';
import { AdvisingController } from './advising.controller';
import { AdvisingService } from './advising.service';
import { ElectivesService } from './electives.service';
import { StudentsController } from './students.controller';
import { StudentNumberCheck } from './student-number-check';
import { StudentsService } from './students.service';
import { SummaryService } from './summary.service';

/** The advisor's workspace: lookup, student page, electives, notes, shortlist, summary e-mail. */
@Module({
  imports: [ModelModule, PseudonymModule, MailModule],
  controllers: [StudentsController, AdvisingController],
  providers: [
    StudentsService,
    ElectivesService,
    AdvisingService,
    SummaryService,
    StudentNumberCheck,
  ],
})
export class StudentsModule {}

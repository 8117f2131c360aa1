#!/usr/bin/env python3
"""Deterministic generator for the seedsort demo corpus (Skerrow Sound Ferries support inbox).

Everything produced here is invented: the ferry company, islands, vessels, people, email
addresses (example.org / example.net / *.test), phone numbers (555-01xx) and all message text.

Run from anywhere:  python corpora_demo/make_corpus.py
It rewrites corpora_demo/documents/, seeds.csv and answer_key.csv; running it twice gives
byte-identical output (one random.Random with a fixed seed drives every choice).
"""

from __future__ import annotations

import csv
import datetime as dt
import email.policy
import email.utils
import html
import io
import mailbox
import random
import shutil
import time
import unicodedata
from email.headerregistry import Address
from email.message import EmailMessage
from pathlib import Path

SEED = 20260301
HERE = Path(__file__).resolve().parent
DOCS = HERE / "documents"
HELPDESK = "Skerrow Sound Ferries Help <help@skerrowferries.test>"

CATEGORIES = [
    "payments_and_refunds",
    "booking_changes",
    "delays_and_cancellations",
    "lost_property",
    "accessibility_assistance",
    "freight_and_vehicles",
    "feedback_and_praise",
]

# --------------------------------------------------------------------------------------
# Slot values
# --------------------------------------------------------------------------------------
FIRST = [
    "Alys", "Bram", "Corin", "Delphine", "Ewan", "Fenella", "Gideon", "Hattie", "Idris", "Jolene",
    "Kester", "Lorna", "Magnus", "Nerys", "Orla", "Piers", "Quinn", "Rhona", "Silas", "Tamsin",
    "Ursula", "Vaughan", "Wren", "Yestin", "Zelda", "Arlo", "Bethan", "Calum", "Dora", "Elspeth",
    "Finlo", "Greer", "Hamish", "Isla", "Jory", "Kirsty", "Lachlan", "Morwen", "Niall", "Petra",
    "Rory", "Sorcha", "Tobias", "Una", "Willa", "Renée", "Jørgen", "Zoë", "Björn", "Anaïs",
]
LAST = [
    "Abernethy", "Bellweather", "Carrow", "Dunmore", "Ellery", "Fairlie", "Garrick", "Halloran",
    "Inchcape", "Jessop", "Kilbride", "Lennox", "Mallory", "Nethercott", "Ormsby", "Pettigrew",
    "Quarrie", "Rathbone", "Stroud", "Tolland", "Upton", "Varley", "Whitcombe", "Yardley",
    "Ashgrove", "Brackley", "Corran", "Drummock", "Eskdale", "Ferris", "Gulliver", "Holmwood",
    "Iverson", "Juniper", "Kettleby", "Loxley", "Maddock", "Norrie", "Oakhurst", "Pendry",
    "Ravenhill", "Sallow", "Thistlewood", "Vane", "Winterbourne", "Ødegård", "Müller-Strand",
    "Lefèvre",
]
DOMAINS = ["example.org", "example.net", "islandpost.test", "haddonmail.test", "fennnet.test"]
ISLANDS = ["Skerrow", "Little Fenn", "Oxholm"]
PORTS = ["Haddon Quay", "Skerrow pier", "Little Fenn slipway", "Oxholm harbour", "the Haddon terminal"]
ROUTES = ["Haddon Quay to Skerrow", "Skerrow to Little Fenn", "Haddon Quay to Oxholm",
          "Oxholm to Skerrow", "Little Fenn to Haddon Quay"]
VESSELS = ["MV Guillemot", "the Guillemot", "Tern Light", "the Tern Light", "MV Halcyon",
           "the Halcyon", "the wee boat", "the relief vessel"]
TIMES = ["06:40", "07:25", "08:15", "09:50", "11:30", "13:05", "14:45", "16:20", "17:30",
         "18:55", "19:10", "20:35"]
WEEKDAYS = ["Monday", "Tuesday", "Wednesday", "Thursday", "Friday", "Saturday", "Sunday"]
MONTHS = ["January", "February", "March", "April", "May", "June", "July", "August"]
ITEMS = ["phone", "purse", "wallet", "rucksack", "reading glasses", "scarf", "rain jacket",
         "camera", "tablet", "umbrella", "hat", "water bottle", "book", "kindle-type e-reader",
         "set of car keys", "bag", "fleece", "binoculars", "headphones", "lunch box", "cardigan"]
COLOURS = ["red", "navy", "green", "black", "yellow", "grey", "purple", "orange", "tan",
           "blue and white", "dark brown", "pink"]
ROLES_MISLEADING = [
    "Freight & Logistics Coordinator, Oxholm Growers' Co-op",
    "Lost Property Volunteer, Haddon Community Library",
    "Accounts & Refunds Assistant, Fenn Valley Garage",
    "Accessibility Officer, Haddon District Council",
    "Bookings Secretary, Skerrow Village Hall",
    "Events & Feedback Lead, Haddon Arts Trust",
    "Delays Team (Rail), Haddon Junction Station",
]
ROLES_PLAIN = [
    "Head Teacher, Skerrow Primary", "Practice Manager", "Retired", "Skerrow Stores",
    "Little Fenn Bakehouse", "Oxholm Farm", "Parish Clerk", "Haddon Quay Guest House",
    "District Nurse (Islands)", "Self-employed joiner", "Oxholm Post Office",
]


def strip_accents(s: str) -> str:
    s = s.replace("ø", "o").replace("Ø", "O")
    s = "".join(c for c in unicodedata.normalize("NFKD", s) if not unicodedata.combining(c))
    return s.encode("ascii", "ignore").decode("ascii")


# --------------------------------------------------------------------------------------
# Phrase pools.  Per category: subjects, core (the problem/request), details, asks,
# notes (staff shorthand, third person), actions (what staff did), asides (a short
# mention of this topic that may be dropped into a document of ANOTHER category).
# --------------------------------------------------------------------------------------
POOLS: dict[str, dict[str, list[str]]] = {
    "payments_and_refunds": {
        "subjects": [
            "Charged twice", "refund?", "Payment problem on website", "Receipt for expenses please",
            "card declined", "Where is my refund", "Resident fare not applied",
            "Question about my bank statement", "money taken but no ticket", "Carnet balance wrong",
            "Invoice query", "overcharged", "Season pass direct debit", "Discount code not working",
            "Unrecognised transaction", "Payment failed 3 times",
        ],
        "core": [
            "I've been charged twice for the same booking ({ref}), two payments of £{amount} left my account on {date}.",
            "My card keeps getting declined at the very last step of checkout even though there is plenty in the account.",
            "I cancelled more than 48 hours before sailing and was told the money would come back to me, but nothing has arrived.",
            "The confirmation says £{amount} but my bank shows a noticeably bigger figure for the same trip.",
            "I'm an Oxholm resident and the island resident fare wasn't applied, so I ended up paying the full adult price.",
            "Could you send a VAT receipt for the crossing on {date}? My employer needs one for my expenses claim.",
            "The kiosk at {port} took my payment but never printed a ticket, and there's no booking under my name.",
            "I bought a book of ten journeys and the app still says I have a balance of zero.",
            "It's been three weeks since I was promised £{amount} back and I still haven't seen a penny of it.",
            "Your website took the money and then showed an error page, so I've paid but have no confirmation.",
            "I was charged a £{fee} amendment fee that the man on the phone said would be waived.",
            "The direct debit for my annual season pass has come out twice this month.",
            "The reimbursement seems to have gone to an old card that I cancelled last year.",
            "Can someone explain the 'harbour levy' line on my invoice? Nobody mentioned it when I paid.",
            "We paid extra for a cabin upgrade we never got because they swapped to the smaller boat, so can that part be paid back?",
            "The over-65 concession price only seems to exist at the ticket office, online I'm charged the normal fare.",
            "We'd like to settle the school group invoice by bank transfer rather than card; what are the account details?",
            "My payment failed three times on the app and now my bank has frozen the card for suspected fraud.",
            "The student discount code STU-{n} is rejected every single time I type it in.",
            "I was charged a full fare for my daughter who should travel free, she's only {age}.",
            "There's a pending transaction of £{amount} from you that I don't recognise at all.",
            "The price went up by £{fee} between putting the trip in the basket and actually paying.",
            "I paid cash at the office on {date} and the clerk forgot to give me a receipt, which I need for my accounts.",
            "My credit card statement shows a foreign transaction fee on your charge, are you billing from abroad?",
            "The gift voucher I was given for my birthday won't go through at checkout, it says invalid.",
            "I've been debited for a booking I cancelled the same evening, within the cooling-off time.",
        ],
        "details": [
            "The last four digits of the card are {digits}.",
            "The booking reference is {ref}, if that helps.",
            "The amount was £{amount}.",
            "My bank says the money was released on your side, so it's not them.",
            "I tried two different cards with the same result.",
            "It was paid through the website on my laptop, not the phone app.",
            "The confirmation email still says 'payment pending'.",
            "My husband's account shows exactly the same charge, so it isn't a one-off.",
            "I'm not trying to be awkward, I just need the money before the end of the month.",
            "I've got the bank statement open in front of me if you need the exact date.",
            "The voucher number is GV-{n}.",
            "I have been a season ticket holder for years and this has never happened before.",
        ],
        "asks": [
            "Please can you refund the duplicate payment?",
            "Could somebody look into it and put the money back?",
            "Can you tell me when the refund will actually reach my account?",
            "Please correct the price and pay back the difference.",
            "Could you email me a proper receipt?",
            "How am I supposed to pay if the card won't go through?",
            "I'd appreciate a breakdown of exactly what I've been charged for.",
            "Please sort this out and confirm once the money has been returned.",
        ],
        "notes": [
            "says charged twice for {ref}, £{amount} x2 on her statement",
            "card declined on the web checkout, tried twice, plenty of funds per caller",
            "refund promised on {date} not received, wants to know where the money is",
            "resident fare not given at booking, paid full price, has island resident card",
            "needs a VAT receipt for crossing on {date} for work expenses",
            "kiosk at {port} took payment, no ticket printed, nothing on the system",
            "10-journey book bought but app shows balance 0",
            "queried 'harbour levy' on invoice, wasn't told about it",
            "student code STU-{n} rejected at checkout",
            "charged for a child under 5, should have been free",
            "unknown pending charge £{amount}, wanted to know what it was for",
            "season pass DD taken twice this month",
            "gift voucher GV-{n} says invalid",
        ],
        "actions": [
            "Passed to accounts for refund.", "Duplicate confirmed, refund raised.",
            "Emailed receipt to customer.", "Asked customer to send statement screenshot.",
            "Logged with finance, 5-7 working days.", "Told her to try a different browser, refunded fee.",
            "Difference refunded to card.", "Escalated to accounts manager.",
        ],
        "asides": [
            "(Separately, I'm still waiting on a refund from last month, but that's another story.)",
            "I was also charged for the booking fee twice, but I'll take that up separately.",
            "On a side note, your payment page is really slow on a phone.",
        ],
    },
    "booking_changes": {
        "subjects": [
            "Change of date", "Need to move my crossing", "Amend booking {ref}", "wrong name on ticket",
            "cancel my return please", "Can I switch to the earlier boat?", "Add a passenger",
            "new car registration", "Booking question", "Swap return leg", "Change of plans",
            "Transfer booking to someone else", "Manage booking page not working", "Booked wrong year!",
        ],
        "core": [
            "I need to move my reservation from {date} to the following weekend, if there's any room.",
            "Could I switch from the {time} to a later sailing on the same day?",
            "My son's name is spelt wrong on the ticket, it should read {first} not {first_typo}.",
            "We're now travelling in a different car; the new registration is {reg}.",
            "I'd like to add one more adult to booking {ref}, my sister has decided to come along after all.",
            "Please cancel my return leg, I'll be staying on {island} longer than planned.",
            "Is it possible to move the outward trip to Thursday and leave the return as it is?",
            "I booked as a foot passenger by mistake and I actually need to bring the car.",
            "We need to go from four travellers down to three, one of the kids is poorly.",
            "Our plans have changed and we'd like to push the whole trip back by a month.",
            "I accidentally booked {date} next year instead of this year.",
            "Can I transfer my booking to my neighbour? I can't make it but she can.",
            "I'm trying to amend the times online but the manage-my-booking page just keeps spinning.",
            "The ticket is an open return but I'd like to fix the date of the way back now.",
            "We'd like to go across a day earlier, on the {time} if there's space for a car with a roof box.",
            "I booked Haddon Quay to Skerrow but we're actually heading on to Little Fenn, can the booking be extended?",
            "Is there a deadline for changing a reservation without losing the fare?",
            "Please swap the lead name on the booking: it's me travelling, not my husband.",
            "We'd like to split our group booking into two, half are coming on the Friday and half on the Saturday.",
            "Could the return be brought forward to the {time} on Sunday instead of Monday morning?",
            "I need to change the day of our crossing because the wedding has been moved.",
            "Can I upgrade from a standard to a flexible ticket now so I can change the date later?",
            "Our caravan trip is off, so we'd like to change the vehicle on the booking to just a normal car.",
            "I'd like to rebook the trip I had to cancel last month for the same dates in {month}.",
        ],
        "details": [
            "The booking reference is {ref}.",
            "We're happy to pay any difference in fare.",
            "Any sailing that afternoon would work for us.",
            "I'm flexible on the time but not on the day.",
            "It's a small hatchback, nowhere near the height limit.",
            "The lead name on the booking is {name}.",
            "There are two adults and a child on it at the moment.",
            "I tried ringing but couldn't get through this morning.",
            "We originally booked back in {month}.",
            "Everything else on the booking can stay the same.",
        ],
        "asks": [
            "Could you change it for me and send a new confirmation?",
            "Let me know if the change can be done and what it would cost.",
            "Please update the booking and confirm by email.",
            "Can you tell me whether there's space before I change anything else?",
            "Please cancel that part and let me know where that leaves the rest of the booking.",
            "Could you amend it or tell me how to do it myself?",
            "Please let me know the new times once it's changed.",
        ],
        "notes": [
            "wants to move booking {ref} from {date} to the weekend after",
            "asked to switch from the {time} to a later sailing same day",
            "name spelt wrong on ticket, should be {first}",
            "new car reg {reg}, needs updating on booking",
            "adding 1 adult to {ref}",
            "cancel return leg only, staying on {island} longer",
            "booked as foot passenger, now bringing car",
            "group booking to be split over Fri/Sat",
            "manage booking page not loading, wanted date changed by phone",
            "booked wrong year by mistake, needs moving to this year",
            "transfer of booking to neighbour, lead name change",
        ],
        "actions": [
            "Amended and new confirmation sent.", "Changed, fare difference £{fee} taken.",
            "No space on requested sailing, offered the {time}.", "Name corrected on system.",
            "Booking amended, no charge.", "Waitlisted for requested date.", "Told her how to do it online.",
        ],
        "asides": [
            "I might also need to move our return trip later, I'll let you know.",
            "(I also still need to change the car registration on my other booking at some point.)",
            "By the way, can my partner be added to the booking for the return?",
        ],
    },
    "delays_and_cancellations": {
        "subjects": [
            "Sailing cancelled this morning", "Why was the boat late AGAIN", "Missed my train because of the delay",
            "Weather cancellations", "Is the {time} running?", "Disruption on {date}", "Reliability",
            "Stranded on {island}", "No announcement about delay", "Commuter complaint",
            "Service updates", "Late boat", "Boat turned back",
        ],
        "core": [
            "The {time} from {port} left almost an hour late and nobody told us why.",
            "Our sailing on {date} was called off at very short notice and we only found out from another passenger.",
            "Because the boat was so late I missed the last bus from Haddon Quay.",
            "This is the third time this month the early crossing simply hasn't run.",
            "We were stuck on {island} overnight after the evening boat was scrapped because of the wind.",
            "Is there any news on when {vessel} will be back in service after the breakdown?",
            "The text alert about the disruption arrived two hours after we'd already been turned away at the pier.",
            "Nobody at the terminal could tell us whether the later sailing would go ahead or not.",
            "The replacement boat is so much smaller that half the cars were left behind on the quay.",
            "I commute every day and the constant late running is making it very hard to keep my job.",
            "The website said 'running to timetable' while we sat in the queue watching the boat not come.",
            "We waited ninety minutes at {port} with no updates, in the rain, with two small children.",
            "Is the {time} likely to run tomorrow given the forecast for gales?",
            "My hospital appointment on the mainland was missed because the morning crossing never went.",
            "The boat turned back halfway across and no one explained what was going on.",
            "When will the revised winter timetable be out, given how many sailings are being dropped?",
            "The tide hold-up was announced over the tannoy but nothing was put online.",
            "We sat on the car deck for forty minutes before leaving and there was no explanation at all.",
            "Three days in a row now the afternoon run has been late getting into {port}.",
            "You cancelled the last sailing of the day and there was no alternative offered, so we had to find a B&B.",
            "The boat was held at {port} for a 'technical issue' and we missed our connection.",
            "Why do the cancellations always seem to be announced after people have already set off to the harbour?",
        ],
        "details": [
            "It was the {time} sailing on {date}.",
            "There were maybe forty of us waiting.",
            "The crew were doing their best, I'm not blaming them personally.",
            "I have a connecting train at {time2} most days.",
            "This was on the {route} route.",
            "The departure board showed 'on time' the entire while.",
            "Honestly the weather didn't seem that bad.",
            "We'd driven two hours to get there.",
            "I signed up for the text alerts specifically to avoid this.",
            "It was the second disruption that week.",
        ],
        "asks": [
            "Can you explain what actually happened?",
            "I'd like to know what you're doing to make the service more reliable.",
            "How do I get told about these things before I leave the house?",
            "Is there any compensation for disrupted sailings?",
            "Could you confirm whether tomorrow's crossing will go?",
            "I'd appreciate an honest answer about what's going on with the timetable.",
            "Please can someone let me know when normal service will resume?",
        ],
        "notes": [
            "complaining {time} from {port} left nearly an hour late, no explanation given",
            "sailing on {date} cancelled short notice, found out from other passengers",
            "missed last bus at Haddon Quay due to late boat",
            "stuck on {island} overnight after evening boat cancelled for wind",
            "asking when {vessel} back in service",
            "text alert came 2 hrs after disruption",
            "daily commuter, upset about late running, worried about job",
            "asking if {time} will run tomorrow with gale forecast",
            "missed hospital appt, morning sailing cancelled",
            "boat turned back mid-crossing, wants explanation",
            "held on car deck 40 mins before departure, no info",
        ],
        "actions": [
            "Explained weather/tech reasons.", "Passed to ops manager.", "Signed her up for SMS alerts.",
            "Gave disruption policy info.", "Told him to check the status page before travelling.",
            "Apologised, complaint logged.",
        ],
        "asides": [
            "(Your boat was late again on the way over, by the way.)",
            "Also, the morning sailing was cancelled twice last week, which didn't help.",
            "The crossing itself was delayed but that's not why I'm writing.",
        ],
    },
    "lost_property": {
        "subjects": [
            "Left my bag on the boat", "Lost property", "lost phone", "Did anyone hand in a jacket?",
            "Child's toy left on board", "Wallet missing after crossing", "Glasses", "Found item?",
            "Keys!!", "Missing rucksack", "Left something on the ferry",
        ],
        "core": [
            "I think I left my {item} on {vessel} on the {time} crossing yesterday.",
            "My daughter left her {item} under a seat in the upper lounge.",
            "Has anyone handed in a {colour} {item}? It went missing somewhere between the car deck and the café.",
            "I can't find my {item} anywhere and the last place I remember having it was the boat from {port}.",
            "We left a {item} in the passenger lounge on {date}, near the windows on the left-hand side.",
            "A small rucksack with my work laptop inside was left on the rack by the stairs.",
            "I dropped my {item} somewhere on the gangway as we were getting off.",
            "I've lost a set of keys on a {colour} fob, most likely on the car deck.",
            "Our little boy's teddy rabbit is missing and he is completely heartbroken.",
            "I think my passport slipped out of my jacket pocket during the crossing.",
            "Someone might have picked up my {item} by mistake in the café.",
            "I left a carrier bag of shopping under the table in the lounge, including a present I'd just bought.",
            "My {colour} {item} must have been left on the outside deck when it started raining and we all ran in.",
            "I was in such a rush to get back to the car that I left my {item} on the seat.",
            "A pair of prescription sunglasses in a hard case has gone missing, I had them on the boat.",
            "My mum left her handbag in the ladies' toilets on {vessel}.",
            "I realised when I got home that my {item} wasn't in the car, it must still be on board.",
        ],
        "details": [
            "It has my name written inside.",
            "It's fairly distinctive, with a {colour} strap.",
            "There's a library card in it with my name on.",
            "It's of sentimental value more than anything.",
            "I already asked at the café counter at {port}.",
            "We were sitting near the children's play corner.",
            "It's a fairly old model with a cracked case.",
            "My phone number is written on a label on the bottom.",
            "It was the {time} on {date}.",
        ],
        "asks": [
            "Could you check and let me know if it's turned up?",
            "If it's been found, could it be posted to me? I'm happy to pay postage.",
            "Please let me know if anything like that has been handed in.",
            "Can I collect it from the office at {port}, and when is it open?",
            "How long do you keep things that are handed in?",
            "Please keep it aside for me if it's there.",
        ],
        "notes": [
            "left {colour} {item} on the {time} crossing",
            "daughter's {item} left under seat in upper lounge",
            "asking if a {item} has been handed in, lost between car deck and café",
            "rucksack w/ laptop left on rack by stairs",
            "keys on {colour} fob, probably car deck",
            "child's teddy rabbit missing, very upset",
            "passport possibly dropped on board",
            "handbag left in ladies toilets on {vessel}",
            "shopping bag left under lounge table",
        ],
        "actions": [
            "Checked LP cupboard, not found yet.", "Found! Holding at {port} office.",
            "Logged in LP book, will call if handed in.", "Asked crew to check.",
            "Item matched, posting out.", "Nothing matching, told to call back Friday.",
        ],
        "asides": [
            "(Oh, and my husband thinks he left his hat on board too, a grey one.)",
            "Also, I left a scarf on the boat a few weeks back, no idea if that was ever found.",
            "While I'm writing: did anyone hand in a pair of gloves from the Tuesday boat?",
        ],
    },
    "accessibility_assistance": {
        "subjects": [
            "Wheelchair access", "Assistance boarding", "Travelling with a guide dog",
            "Help needed for elderly passenger", "Lift out of order again", "Mobility scooter",
            "Blue badge parking at terminal", "Hearing loop", "Priority boarding?", "Access at low tide",
            "Quiet space on board",
        ],
        "core": [
            "My mother uses a wheelchair and I'd like to arrange help getting her on and off at {port}.",
            "Is there a lift from the car deck up to the passenger lounge on {vessel}?",
            "I'm partially sighted and travel with a guide dog; can she stay with me in the lounge?",
            "The lift on {vessel} was out of order again and I had to be helped up the stairs, which was humiliating.",
            "Can I take my mobility scooter on as a foot passenger, or does it need to go down on the car deck?",
            "I have a hidden disability and find the boarding queue really hard; is there any priority boarding?",
            "Are there accessible toilets on the smaller boat that does the Little Fenn run?",
            "The ramp at {port} is very steep at low tide and my husband couldn't manage it in his chair.",
            "I'm deaf and missed the announcement that we'd changed berth; are announcements shown on screens anywhere?",
            "We'll need a blue badge space close to the terminal building on {date}.",
            "My son is autistic and loud crowded spaces are hard for him; is there a quieter area on board?",
            "I'll be on crutches after an operation, could someone meet me at the bottom of the gangway?",
            "Does the hearing loop at the ticket office actually work? It didn't seem to on Monday.",
            "Can my carer travel with me at no cost, and how do I let the crew know I need support?",
            "My dad has dementia and gets very anxious, could a member of staff keep an eye on him during the crossing?",
            "I use a powered wheelchair that weighs about 150 kg; will the ramps take it?",
            "The only step-free route from the car park at {port} was blocked by a delivery van.",
            "Is there somewhere on board where I could lie down? I have a chronic pain condition.",
            "Could the crew let me stay in the car during the crossing? Climbing the stairs from the car deck isn't possible for me.",
        ],
        "details": [
            "The wheelchair is a standard manual one, not electric.",
            "Short distances on foot are fine with a walking frame.",
            "We'll be travelling on the {time} on {date}.",
            "We're happy to arrive early if that helps.",
            "The dog is fully trained and wears a harness.",
            "Last time the staff were lovely but nobody could find the key for the ramp.",
            "The person travelling is {age2} and very independent, just needs a hand with steps.",
            "I'll be travelling alone this time.",
        ],
        "asks": [
            "Please can you book assistance for us?",
            "Could you tell me what help is available?",
            "I'd like to know what arrangements you can make before I travel.",
            "Can someone confirm there will be staff on hand?",
            "Please let the crew know to expect us.",
            "What's the best way to request support in future?",
        ],
        "notes": [
            "wheelchair user travelling {date}, needs help boarding at {port}",
            "asks about lift car deck to lounge on {vessel}",
            "guide dog user, wants to stay in lounge with dog",
            "complaint: lift out of order on {vessel}, had to be helped up stairs",
            "mobility scooter as foot passenger query",
            "hidden disability, asks about priority boarding",
            "ramp too steep at low tide at {port}, husband in wheelchair",
            "deaf passenger missed berth change announcement",
            "autistic son, wants quiet area on board",
            "carer travelling free query + how to flag assistance",
            "father with dementia, asked if staff can keep an eye",
        ],
        "actions": [
            "Assistance booked, crew notified.", "Sent accessibility guide.", "Reported lift fault to engineering.",
            "Added note to booking for priority boarding.", "Told her to ask at the ramp for help.",
            "Passed to terminal supervisor.",
        ],
        "asides": [
            "(The lift was out of action again too, which made it harder with the pram.)",
            "My mum will be with me and she's a bit unsteady on the ramp, for what it's worth.",
            "Also, there was no one around to help my dad with his walker last time.",
        ],
    },
    "freight_and_vehicles": {
        "subjects": [
            "Freight booking for trailer", "Livestock transport", "Van height", "Moving house to {island}",
            "Sending a pallet", "Horsebox on the ferry", "Gas cylinders", "Commercial account enquiry",
            "Caravan length", "Tractor crossing", "Unaccompanied freight", "Minibus", "Motorhome",
        ],
        "core": [
            "I need to get a {len} metre flatbed trailer over to {island} next week with building materials.",
            "We're moving house to {island} and want to know if a removals lorry can go on the freight run.",
            "Can I bring a horsebox on the {time}? It's a two-horse box towed by a 4x4.",
            "Our van is {height} m high with the roof rack on; will it fit on the car deck?",
            "We're a farm on Oxholm and need to ship about {n} sheep to the mainland mart.",
            "Is it allowed to carry propane gas bottles in the car, or do they have to go as dangerous goods?",
            "I want to send a pallet of fencing posts to my croft, can it travel without me?",
            "Our business delivers groceries to the island shop twice a week, could we set up a commercial account?",
            "What's the longest caravan you can take on the Little Fenn boat?",
            "The tractor and bale trailer need to go across for the harvest, who do I speak to about axle weights?",
            "Do you carry parcels as unaccompanied freight, and what are the cut-off times for dropping them off?",
            "We're bringing a minibus for a choir trip; does that count as a commercial vehicle?",
            "My motorhome is just over 7 metres long, do I need to book it differently?",
            "We've got an electric van, does it need to be below a certain charge level to go on board?",
            "Can a skip lorry go on the early freight sailing?",
            "We need to bring a mini digger on a low-loader for a job on {island}.",
            "How do I get a quote for shipping a container of kitchen units over?",
            "I've got a builder's van with a ladder rack that sticks out about a metre at the back, is that allowed?",
            "Our haulier wants to know the maximum gross weight your ramp can take.",
            "Could we take a boat trailer with a small fishing boat across, and how is it charged?",
            "Do we have to declare the diesel we're carrying in jerry cans in the pickup?",
        ],
        "details": [
            "Total weight is roughly {tonnes} tonnes.",
            "The driver will stay with the vehicle throughout.",
            "The load is strapped down and sheeted.",
            "We'd need this every fortnight through the summer.",
            "It'd be going from {port} over to {island}.",
            "It's about {len} metres nose to tail including the hitch.",
            "We can be flexible on the day but need to be there before noon.",
            "We've got all the movement licences for the animals.",
        ],
        "asks": [
            "Could you let me know the rates and how to book?",
            "What paperwork do you need from us?",
            "Please tell me whether this is possible and when.",
            "Who's the best person to talk to about freight?",
            "Can you reserve a freight slot for us?",
            "Can you send over a quote?",
        ],
        "notes": [
            "{len} m flatbed trailer to {island} next week, building materials",
            "removals lorry for house move to {island}, asks about freight run",
            "horsebox + 4x4 on the {time}?",
            "van {height} m with roof rack, height limit query",
            "Oxholm farm, ~{n} sheep to mainland mart",
            "gas bottles in car, dangerous goods question",
            "pallet of fence posts unaccompanied to croft",
            "grocery delivery firm wants commercial account",
            "motorhome just over 7 m, how to book",
            "mini digger on low-loader, weight query",
        ],
        "actions": [
            "Sent freight rates + booking form.", "Passed to freight desk.", "Quote emailed.",
            "Slot held on the 06:40 freight.", "Told him to declare DG at check-in.",
            "Asked for exact dimensions/weight.",
        ],
        "asides": [
            "(Next month I'll also need to bring a trailer over, so I'll be in touch about that.)",
            "We may also need to send a pallet over later in the year.",
            "Our van is quite tall, if that matters.",
        ],
    },
    "feedback_and_praise": {
        "subjects": [
            "Thank you!", "Lovely crossing", "Compliments to the crew", "Suggestion for the café",
            "Feedback", "A few thoughts", "Great service", "Idea for the waiting room", "Well done",
            "Just a note", "Suggestion",
        ],
        "core": [
            "I just wanted to say a huge thank you to the crew of {vessel} on {date}.",
            "The young man in the café on the {time} was so kind to my kids, please pass on our thanks.",
            "We've been using the ferry for twenty years and it's never been better run.",
            "One small suggestion: it would be great to have some vegetarian options in the café other than crisps.",
            "The new waiting room at {port} is brilliant, warm and spotless.",
            "The skipper's little commentary about the seals was the highlight of our holiday.",
            "It would be nice if there were a few more benches on the outside deck.",
            "Could you consider selling local produce in the shop on board? The island bakers would love it.",
            "Whoever redesigned the timetable leaflets did a great job, they're so much easier to read.",
            "I'd love to see a water refill point in the terminal instead of plastic bottles.",
            "The staff at the ticket desk went above and beyond when I turned up flustered and late.",
            "Just a quick note to say the boat was immaculate and everyone was friendly.",
            "My only gripe is the music in the lounge is a bit loud, otherwise it was perfect.",
            "The new bike racks on deck are a great addition, thank you for listening to cyclists.",
            "Keep up the good work, the service is a lifeline for us islanders.",
            "The deckhand who helped my elderly aunt with her bags was a real gentleman.",
            "Have you thought about a loyalty scheme for regular foot passengers? Just an idea.",
            "The soup in the café was honestly the best I've had all winter.",
            "It was lovely to see the children's colouring sheets about island wildlife, my grandson loved them.",
            "Could the notice boards in the terminal show a few local walks? Visitors are always asking.",
        ],
        "details": [
            "The name badge said {first}, I think.",
            "Honestly, I can't fault the service.",
            "Ten out of ten from our family.",
            "It's the little touches that make the difference.",
            "Credit where it's due, you've really improved things.",
            "I just wanted it recorded somewhere how good it was.",
            "We were genuinely impressed.",
            "We travelled on the {route} route.",
            "We'll definitely be back next summer.",
            "I know it's a small thing but it really made our day.",
            "I filled in the survey card as well but wanted to write properly.",
            "My whole family agreed it was the best part of the trip.",
        ],
        "asks": [
            "Please pass this on to the team.",
            "No need to reply, just wanted to share.",
            "Hope this is useful.",
            "Maybe something to consider for next season?",
            "Thanks again to everyone involved.",
            "Just a suggestion, feel free to ignore!",
            "Well done all.",
        ],
        "notes": [
            "called to praise crew of {vessel} on {date}",
            "wanted to thank café staff on the {time}, kind to her kids",
            "suggests veggie options in café",
            "likes new waiting room at {port}",
            "compliment: skipper's wildlife commentary",
            "suggests more benches on outside deck",
            "suggests local produce in on-board shop",
            "compliment on new timetable leaflets",
            "suggests water refill point in terminal",
            "praised deckhand who helped aunt with bags",
        ],
        "actions": [
            "Passed to crew manager.", "Logged as compliment.", "Forwarded to café supplier.",
            "Added to suggestions list.", "Thanked caller.",
        ],
        "asides": [
            "By the way, the café staff were lovely as always.",
            "(The crew were brilliant, I should add.)",
            "Apart from this, I really do enjoy the crossing.",
        ],
    },
}

GREETINGS = ["Hi,", "Hello,", "Dear Skerrow Sound Ferries,", "Good morning,", "Hi there,",
             "To whom it may concern,", "Hiya,", "Dear Sir/Madam,", "Hello there,", "Morning,",
             "Dear team,", "Hi folks,"]
OPENERS = [
    "I hope you can help.", "Sorry to bother you.", "I tried the FAQ page but couldn't find an answer.",
    "I'm writing on behalf of my mum, who doesn't use email.", "Bit of a long one, sorry.",
    "I rang earlier but the line was engaged.", "Quick question.", "Not sure if this is the right address for this.",
    "We were over on holiday last week.", "I travel with you most weeks.",
    "First time writing in, so apologies if this is in the wrong place.",
    "I'll try to keep this short.", "My neighbour suggested I email you.",
]
CLOSERS = [
    "Thanks in advance.", "Many thanks for your help.", "Looking forward to hearing from you.",
    "Appreciate it.", "Any help gratefully received.", "Thank you.",
    "I'd be grateful for a reply when you get a chance.", "Hope to hear back soon.",
]
SIGNOFFS = ["Thanks,", "Best regards,", "Cheers,", "Kind regards,", "Many thanks,", "Regards,", "Best wishes,"]


# --------------------------------------------------------------------------------------
class Gen:
    def __init__(self, seed: int) -> None:
        self.r = random.Random(seed)

    # ---- slots ------------------------------------------------------------------------
    def person(self) -> tuple[str, str]:
        first, last = self.r.choice(FIRST), self.r.choice(LAST)
        local = strip_accents(f"{first}.{last}").lower().replace(" ", "").replace("'", "")
        if self.r.random() < 0.3:
            local = strip_accents(first).lower() + str(self.r.randint(1, 99))
        return f"{first} {last}", f"{local}@{self.r.choice(DOMAINS)}"

    def phone(self) -> str:
        return f"555-01{self.r.randint(0, 99):02d}"

    def date_phrase(self) -> str:
        r = self.r
        k = r.random()
        if k < 0.3:
            return f"{r.choice(WEEKDAYS)} {r.randint(1, 28)} {r.choice(MONTHS)}"
        if k < 0.5:
            return f"the {r.randint(1, 28)}{'th'}".replace("1th", "1st").replace("2th", "2nd").replace("3th", "3rd").replace("11st", "11th").replace("12nd", "12th").replace("13rd", "13th")
        if k < 0.7:
            return r.choice(["yesterday", "last Friday", "Saturday just gone", "Sunday", "last week",
                             "Tuesday", "Wednesday morning", "the bank holiday"])
        return f"{r.randint(1, 28):02d}/{r.randint(1, 4):02d}"

    def slots(self) -> dict[str, str]:
        r = self.r
        first = r.choice(FIRST)
        typo = first[:-1] + r.choice("aeiouy") if len(first) > 3 else first + "e"
        if typo == first:
            typo = first + "h"
        name, _ = self.person()
        letters = "ABCDEFGHJKLMNPRSTVWXY"
        return {
            "ref": "SSF-" + "".join(r.choice("ABCDEFGHJKMNPQRTUVWXY23456789") for _ in range(6)),
            "amount": f"{r.randint(9, 240)}.{r.choice(['00', '50', '20', '75', '40', '90'])}",
            "fee": str(r.choice([5, 8, 10, 12, 15, 20])),
            "date": self.date_phrase(),
            "time": r.choice(TIMES),
            "time2": r.choice(TIMES),
            "port": r.choice(PORTS),
            "island": r.choice(ISLANDS),
            "route": r.choice(ROUTES),
            "vessel": r.choice(VESSELS),
            "item": r.choice(ITEMS),
            "colour": r.choice(COLOURS),
            "first": first,
            "first_typo": typo,
            "name": name,
            "reg": f"{r.choice(letters)}{r.choice(letters)}{r.randint(10, 74)} {''.join(r.choice(letters) for _ in range(3))}",
            "age": str(r.randint(2, 4)),
            "age2": str(r.randint(78, 94)),
            "digits": f"{r.randint(0, 9999):04d}",
            "n": str(r.randint(20, 480)),
            "len": str(r.choice([4, 5, 6, 7, 8, 9, 11, 12])),
            "height": r.choice(["2.1", "2.4", "2.6", "2.8", "3.0", "3.2"]),
            "tonnes": str(r.choice([2, 3, 3.5, 5, 7.5, 12, 18])),
            "month": r.choice(MONTHS),
        }

    # ---- text helpers -----------------------------------------------------------------
    def typos(self, text: str, rate: float) -> str:
        r = self.r
        out = []
        for w in text.split(" "):
            if len(w) > 3 and w.isalpha() and r.random() < rate:
                i = r.randrange(1, len(w) - 1)
                k = r.random()
                if k < 0.4:
                    w = w[:i] + w[i + 1] + w[i] + w[i + 2:]
                elif k < 0.75:
                    w = w[:i] + w[i + 1:]
                else:
                    w = w[:i] + w[i] + w[i:]
            out.append(w)
        return " ".join(out)

    def fill(self, s: str, sl: dict[str, str]) -> str:
        return s.format_map(sl)

    def body_sentences(self, cat: str, sl: dict[str, str], *, size: str, aside: bool) -> list[str]:
        """The category-bearing sentences of one message (no greeting/sign-off)."""
        r, p = self.r, POOLS[cat]
        n_core = {"tiny": 1, "short": r.choice([1, 2]), "medium": 2, "long": 2}[size]
        if cat == "feedback_and_praise" and size == "long":
            n_core = 3  # several compliments/suggestions in one go is normal; several problems is not
        n_det = {"tiny": 0, "short": r.choice([0, 1]), "medium": r.choice([1, 1, 2]), "long": r.choice([3, 4])}[size]
        sents = [self.fill(s, sl) for s in r.sample(p["core"], n_core)]
        dets = [self.fill(s, sl) for s in r.sample(p["details"], min(n_det, len(p["details"])))]
        for d in dets:
            sents.insert(r.randint(1, len(sents)), d)
        if size != "tiny" and r.random() < 0.75:
            sents.append(self.fill(r.choice(p["asks"]), sl))
        if aside:
            other = r.choice([c for c in CATEGORIES if c != cat])
            sents.insert(r.randint(1, len(sents)), r.choice(POOLS[other]["asides"]))
        return [s for s in sents if s]

    def paragraphs(self, sents: list[str]) -> str:
        r = self.r
        paras, cur = [], []
        for s in sents:
            cur.append(s)
            if len(cur) >= 2 and r.random() < 0.45:
                paras.append(" ".join(cur))
                cur = []
        if cur:
            paras.append(" ".join(cur))
        return "\n\n".join(paras)

    def pick_size(self) -> str:
        return self.r.choices(["tiny", "short", "medium", "long"], weights=[1, 3, 4, 2])[0]

    def customer_text(self, cat: str, *, size: str | None = None, aside: bool | None = None,
                      greet: bool = True, sl: dict[str, str] | None = None) -> tuple[str, dict]:
        r = self.r
        sl = sl or self.slots()
        size = size or self.pick_size()
        aside = (r.random() < 0.15) if aside is None else aside
        sents = self.body_sentences(cat, sl, size=size, aside=aside)
        if size in ("medium", "long") and r.random() < 0.5:
            sents.insert(0, r.choice(OPENERS))
        if size != "tiny" and r.random() < 0.45:
            sents.append(r.choice(CLOSERS))
        text = self.paragraphs(sents)
        if r.random() < 0.3:
            text = self.typos(text, 0.06)
        if r.random() < 0.08:
            text = text.lower()
        if greet and r.random() < 0.8:
            text = r.choice(GREETINGS) + "\n\n" + text
        return text, {"size": size, "aside": aside, "slots": sl}

    # ---- email pieces -----------------------------------------------------------------
    def signature(self, name: str, cat: str) -> str:
        r = self.r
        first = name.split()[0]
        k = r.random()
        if k < 0.15:
            return ""
        role = r.choice(ROLES_MISLEADING) if r.random() < 0.3 else r.choice(ROLES_PLAIN)
        if k < 0.45:
            lines = ["-- ", name]
            if r.random() < 0.7:
                lines.append(role)
            lines.append(f"Tel: {self.phone()}")
            return "\n".join(lines)
        if k < 0.85:
            lines = [r.choice(SIGNOFFS), name if r.random() < 0.6 else first]
            if r.random() < 0.5:
                lines.append(role)
            if r.random() < 0.6:
                lines.append(self.phone())
            return "\n".join(lines)
        return r.choice(["Cheers\n", "Thanks\n", "Ta,\n", ""]) + first

    def quoted_chain(self, cat_other: str, when: dt.datetime, their_name: str, their_addr: str,
                     subject: str) -> str:
        """An earlier message on ANOTHER topic, quoted below the reply."""
        r = self.r
        old_text, _ = self.customer_text(cat_other, size=r.choice(["short", "medium", "long"]), aside=False)
        old_text += "\n\n" + their_name.split()[0]
        style = r.random()
        if style < 0.55:
            head = f"On {when.strftime('%a, %d %b %Y')} at {when.strftime('%H:%M')}, {their_name} <{their_addr}> wrote:"
            quoted = "\n".join(("> " + ln) if ln else ">" for ln in old_text.split("\n"))
            return head + "\n" + quoted
        if style < 0.8:
            # header-block style ("-----Original Message-----")
            return ("-----Original Message-----\n"
                    f"From: {their_name} <{their_addr}>\n"
                    f"Sent: {when.strftime('%d %B %Y %H:%M')}\n"
                    f"To: help@skerrowferries.test\n"
                    f"Subject: {subject}\n\n" + old_text)
        # staff reply quoted (> block only, no header line) on another topic
        staff_first = r.choice(["Morag", "Eilidh", "Tomas", "Ruaridh", "Ffion"])
        reply = (f"Dear {their_name.split()[0]},\n\nThank you for your message. Our notes say: "
                 + self.fill(r.choice(POOLS[cat_other]["notes"]), self.slots())
                 + ".\nUpdate: " + self.fill(r.choice(POOLS[cat_other]["actions"]), self.slots())
                 + f"\n\nKind regards,\n{staff_first}\nCustomer Services, Skerrow Sound Ferries")
        return "\n".join(("> " + ln) if ln else ">" for ln in reply.split("\n"))

    def subject(self, cat: str, sl: dict[str, str]) -> str:
        r = self.r
        if r.random() < 0.12:
            return r.choice(["Query", "Help please", "question", "Enquiry", "(no subject)", "urgent", "Hello"])
        s = self.fill(r.choice(POOLS[cat]["subjects"]), sl)
        return s.lower() if r.random() < 0.15 else s

    def email(self, cat: str, idx: int, when: dt.datetime, *, kind: str, reply: bool,
              attachment: bool, domain_tag: str) -> tuple[EmailMessage, dict]:
        r = self.r
        name, addr = self.person()
        sl = self.slots()
        body, meta = self.customer_text(cat, sl=sl)
        sig = self.signature(name, cat)
        if sig:
            body = body + "\n\n" + sig
        subj = self.subject(cat, sl)
        if reply:
            other = r.choice([c for c in CATEGORIES if c != cat])
            earlier = when - dt.timedelta(days=r.randint(2, 40), minutes=r.randint(0, 600))
            subj_old = self.subject(other, self.slots())
            chain = self.quoted_chain(other, earlier, name, addr, subj_old)
            body = body + "\n\n" + chain
            k = r.random()
            if k < 0.6:  # customer kept the thread but typed a new subject
                subj = self.subject(cat, sl)
            elif k < 0.85:  # generic thread subject
                subj = "Re: " + r.choice(["Your enquiry", f"Case {r.randint(40000, 49999)}",
                                          "Skerrow Sound Ferries - we've received your message",
                                          "Your message to Skerrow Sound Ferries", "Follow-up"])
            else:  # old subject kept although the topic changed
                subj = ("Re: " if r.random() < 0.6 else "RE: ") + subj_old
        msg = EmailMessage()
        msg["From"] = Address(display_name=name, addr_spec=addr)
        msg["To"] = HELPDESK
        msg["Subject"] = subj
        msg["Date"] = email.utils.format_datetime(when)
        msg["Message-ID"] = f"<{domain_tag}.{idx:04d}.{r.getrandbits(40):010x}@{addr.split('@')[1]}>"
        if reply:
            msg["In-Reply-To"] = f"<ref.{r.getrandbits(32):08x}@skerrowferries.test>"
        html_body = "<html><body>" + "".join(
            "<p>" + html.escape(p).replace("\n", "<br>\n") + "</p>\n" for p in body.split("\n\n")
        ) + "</body></html>\n"
        if kind == "html":
            msg.set_content(html_body, subtype="html")
        else:
            msg.set_content(body + "\n", cte="quoted-printable" if r.random() < 0.3 else "8bit")
            if kind == "alt":
                msg.add_alternative(html_body, subtype="html")
        if attachment:
            if cat == "payments_and_refunds":
                msg.add_attachment(b"%PDF-1.4\n% invented placeholder, not a real statement\n%%EOF\n",
                                   maintype="application", subtype="pdf", filename="bank-statement.pdf")
            else:
                msg.add_attachment(bytes(range(256)) * 2, maintype="image", subtype="jpeg",
                                   filename="photo.jpg")
        # deterministic MIME boundaries
        for part in msg.walk():
            if part.is_multipart():
                part.set_boundary(f"==seedsort-demo-{idx:04d}-{r.getrandbits(32):08x}==")
        meta.update(reply=reply, kind=kind)
        return msg, meta

    # ---- notes ------------------------------------------------------------------------
    def note_text(self, cat: str, style: str, when: dt.datetime) -> tuple[str, dict]:
        r = self.r
        sl = self.slots()
        p = POOLS[cat]
        staff = r.choice(["MK", "EB", "Tomas", "Ruaridh", "Ffion", "JP", "desk", "AH"])
        if style == "call":
            name, _ = self.person()
            n = r.choice([1, 1, 1, 2])
            bits = [self.fill(s, sl) for s in r.sample(p["notes"], n)]
            if r.random() < 0.3:
                det = self.fill(r.choice(p["details"]), sl)
                bits.append("Quote: \"" + det + "\"")
            lines = [f"Phone call {when.strftime('%Y-%m-%d %H:%M')} ({staff})",
                     f"Caller: {name}, tel {self.phone()}", ""]
            lines.append(". ".join(b[0].upper() + b[1:] for b in bits) + ".")
            if r.random() < 0.2:
                other = r.choice([c for c in CATEGORIES if c != cat])
                lines.append("Also mentioned: " + self.fill(r.choice(POOLS[other]["notes"]), self.slots()) + " (told her to email).")
            lines += ["", "Action: " + self.fill(r.choice(p["actions"]), sl)]
            text = "\n".join(lines) + "\n"
            if r.random() < 0.3:
                text = self.typos(text, 0.04)
            return text, {"size": "medium", "aside": False}
        if style == "desk":
            who = r.choice(["Lady", "Gent", "Young couple", "Older man", "Woman with two kids", "Visitor",
                            "Regular (knows us)", "Islander"])
            bits = [self.fill(s, sl) for s in r.sample(p["notes"], 1)]
            if r.random() < 0.4:
                bits.append("said: \"" + self.fill(r.choice(p["details"]), sl) + "\"")
            text = (f"Front desk, {r.choice(PORTS).replace('the ', '')}, {when.strftime('%d/%m/%Y')}\n"
                    f"{who} came to the window - " + "; ".join(bits) + ".\n"
                    + self.fill(r.choice(p["actions"]), sl) + f" -- {staff}\n")
            return text, {"size": "short", "aside": False}
        # survey free text (first person, short)
        size = r.choice(["tiny", "short", "short", "medium"])
        body, meta = self.customer_text(cat, size=size, greet=False, sl=sl)
        return body + "\n", meta


# --------------------------------------------------------------------------------------
def write_all() -> None:
    g = Gen(SEED)
    r = g.r
    if DOCS.exists():
        shutil.rmtree(DOCS)
    (DOCS / "inbox").mkdir(parents=True)
    (DOCS / "notes").mkdir()
    (DOCS / "exports").mkdir()

    weights = [18, 17, 16, 12, 10, 12, 15]

    def draw_cats(n: int) -> list[str]:
        # near-proportional, shuffled
        base = []
        for c, w in zip(CATEGORIES, weights):
            base += [c] * round(n * w / sum(weights))
        while len(base) < n:
            base.append(r.choices(CATEGORIES, weights=weights)[0])
        base = base[:n]
        r.shuffle(base)
        return base

    labels: dict[str, str] = {}
    meta: dict[str, dict] = {}

    # ---- inbox/*.eml -------------------------------------------------------------------
    n_eml = 110
    cats = draw_cats(n_eml)
    start = dt.datetime(2026, 1, 5, 8, 0, tzinfo=dt.timezone.utc)
    kinds = ["plain"] * n_eml
    for i in r.sample(range(n_eml), 5):
        kinds[i] = "html"
    for i in r.sample([i for i in range(n_eml) if kinds[i] == "plain"], 8):
        kinds[i] = "alt"
    attach_idx = set(r.sample([i for i in range(n_eml) if kinds[i] == "plain"], 2))
    for i, cat in enumerate(cats):
        when = start + dt.timedelta(hours=i * 17 + r.randint(0, 9), minutes=r.randint(0, 59))
        msg, m = g.email(cat, i + 1, when, kind=kinds[i], reply=r.random() < 0.5,
                         attachment=i in attach_idx, domain_tag="inbox")
        did = f"inbox/{i + 1:04d}.eml"
        (DOCS / did).write_bytes(msg.as_bytes(policy=email.policy.default))
        labels[did], meta[did] = cat, {**m, "fmt": "eml"}

    # ---- inbox-archive.mbox ------------------------------------------------------------
    n_mbox = 40
    cats = draw_cats(n_mbox)
    mb_path = DOCS / "inbox-archive.mbox"
    box = mailbox.mbox(str(mb_path), create=True)
    box.lock()
    start = dt.datetime(2025, 9, 1, 9, 0, tzinfo=dt.timezone.utc)
    for i, cat in enumerate(cats):
        when = start + dt.timedelta(days=i * 2 + r.randint(0, 1), minutes=r.randint(0, 600))
        kind = "alt" if r.random() < 0.1 else "plain"
        msg, m = g.email(cat, i + 1, when, kind=kind, reply=r.random() < 0.45, attachment=False,
                         domain_tag="archive")
        mm = mailbox.mboxMessage(msg)
        mm.set_from("MAILER-DAEMON", time.gmtime(when.timestamp()))
        box.add(mm)
        did = f"inbox-archive.mbox#message-{i + 1}"
        labels[did], meta[did] = cat, {**m, "fmt": "mbox"}
    box.flush()
    box.unlock()
    box.close()

    # ---- notes -------------------------------------------------------------------------
    n_notes = 58  # + 2 empty = 60 txt/md
    cats = draw_cats(n_notes)
    start = dt.datetime(2026, 1, 6, 9, 0)
    used: set[str] = set()
    for i, cat in enumerate(cats):
        when = start + dt.timedelta(days=i + r.randint(0, 1), hours=r.randint(0, 8), minutes=r.randint(0, 59))
        style = r.choices(["call", "desk", "survey"], weights=[4, 3, 3])[0]
        text, m = g.note_text(cat, style, when)
        last = strip_accents(r.choice(LAST)).lower().replace("'", "").replace(" ", "-")
        if style == "call":
            fname = f"call-{when.strftime('%Y-%m-%d')}-{last}.txt"
        elif style == "desk":
            fname = f"desk-{when.strftime('%Y-%m-%d')}-{i + 1:02d}.txt"
        else:
            ext = "md" if r.random() < 0.5 else "txt"
            if ext == "md":
                text = (f"# Survey response {4000 + i * 7}\n\n**Q: Anything else you would like to tell us?**\n\n"
                        + text)
            fname = f"survey-{4000 + i * 7}.{ext}"
        while fname in used:
            fname = fname.replace(".", "-b.", 1)
        used.add(fname)
        did = f"notes/{fname}"
        (DOCS / did).write_text(text, encoding="utf-8")
        labels[did], meta[did] = cat, {**m, "fmt": "note"}
    # the two empty documents (not labelled anywhere)
    (DOCS / "notes/desk-2026-02-14-blank.txt").write_text("", encoding="utf-8")
    (DOCS / "notes/survey-4999.md").write_text("   \n\n  \n", encoding="utf-8")

    # ---- notes/*.html ------------------------------------------------------------------
    html_cats = ["delays_and_cancellations", "lost_property", "accessibility_assistance",
                 "freight_and_vehicles", "feedback_and_praise"]
    for i, cat in enumerate(html_cats):
        when = dt.datetime(2026, 2, 2 + i * 5, 11, 0)
        sl = g.slots()
        p = POOLS[cat]
        items = [g.fill(r.choice(p["notes"]), sl), g.fill(r.choice(p["details"]), sl)]
        title = f"Case note {when.strftime('%Y-%m-%d')}"
        body = g.fill(r.choice(p["core"]), sl)
        page = (
            "<!DOCTYPE html>\n<html lang=\"en\">\n<head><meta charset=\"utf-8\">"
            f"<title>{html.escape(title)}</title></head>\n<body>\n"
            f"<h1>{html.escape(title)}</h1>\n"
            f"<p class=\"meta\">Shared note, {when.strftime('%d %b %Y')}, customer services</p>\n"
            f"<p>Customer wrote: <em>&ldquo;{html.escape(body)}&rdquo;</em></p>\n<p>Summary:</p>\n<ul>\n"
            + "".join(f"  <li>{html.escape(x)}</li>\n" for x in items)
            + f"</ul>\n<p><strong>Status:</strong> {html.escape(g.fill(r.choice(p['actions']), sl))}</p>\n"
            "</body>\n</html>\n"
        )
        did = f"notes/shared-note-{when.strftime('%Y-%m-%d')}.html"
        (DOCS / did).write_text(page, encoding="utf-8")
        labels[did], meta[did] = cat, {"size": "medium", "aside": False, "fmt": "html"}

    # ---- exports/tickets.csv -----------------------------------------------------------
    n_tk = 120
    cats = draw_cats(n_tk)
    start = dt.datetime(2026, 1, 5, 7, 30)
    rows = []
    for i, cat in enumerate(cats):
        tid = f"T-{1001 + i}"
        when = start + dt.timedelta(hours=i * 14 + r.randint(0, 10), minutes=r.randint(0, 59))
        channel = r.choice(["web form", "web form", "app", "phone", "chat", "kiosk", "email"])
        sl = g.slots()
        desc, m = g.customer_text(cat, sl=sl, greet=r.random() < 0.25)
        desc = desc.replace("\n\n", " ").replace("\n", " ")
        subj = g.subject(cat, sl)
        rows.append([tid, when.strftime("%Y-%m-%d %H:%M"), channel, subj, desc])
        did = f"exports/tickets.csv#{tid}"
        labels[did], meta[did] = cat, {**m, "fmt": "csv"}
    # the very short one
    i_short = 17
    rows[i_short][2], rows[i_short][3], rows[i_short][4] = "chat", "", "card declined again??"
    labels[f"exports/tickets.csv#{rows[i_short][0]}"] = "payments_and_refunds"
    meta[f"exports/tickets.csv#{rows[i_short][0]}"] = {"size": "tiny", "aside": False, "fmt": "csv"}
    # an exact duplicate (same subject and description, submitted twice)
    src, dup = 40, 41
    rows[dup][3], rows[dup][4] = rows[src][3], rows[src][4]
    rows[dup][2] = "web form"
    labels[f"exports/tickets.csv#{rows[dup][0]}"] = labels[f"exports/tickets.csv#{rows[src][0]}"]
    meta[f"exports/tickets.csv#{rows[dup][0]}"] = {**meta[f"exports/tickets.csv#{rows[src][0]}"], "dup": True}
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(["ticket_id", "opened", "channel", "subject", "description"])
    w.writerows(rows)
    (DOCS / "exports/tickets.csv").write_text(buf.getvalue(), encoding="utf-8")

    # ---- seeds: 5 per category, typical docs, spread across formats ---------------------
    seeds: dict[str, str] = {}
    fmt_plan = ["eml", "csv", "note", "mbox", "eml"]
    for cat in CATEGORIES:
        for fmt in fmt_plan:
            cands = sorted(d for d, c in labels.items() if c == cat and d not in seeds
                           and meta[d]["fmt"] == fmt and meta[d].get("size") in ("medium", "long", "short")
                           and not meta[d].get("aside") and not meta[d].get("dup"))
            if not cands:
                cands = sorted(d for d, c in labels.items() if c == cat and d not in seeds
                               and not meta[d].get("dup") and meta[d].get("size") != "tiny")
            seeds[r.choice(cands)] = cat

    with open(HERE / "seeds.csv", "w", newline="", encoding="utf-8") as f:
        w = csv.writer(f, lineterminator="\n")
        w.writerow(["document", "category"])
        for d in sorted(seeds, key=lambda d: (CATEGORIES.index(seeds[d]), d)):
            w.writerow([d, seeds[d]])
    with open(HERE / "answer_key.csv", "w", newline="", encoding="utf-8") as f:
        w = csv.writer(f, lineterminator="\n")
        w.writerow(["document", "category"])
        for d in sorted(labels):
            if d not in seeds:
                w.writerow([d, labels[d]])


if __name__ == "__main__":
    write_all()

"""Rules layer: caution rules, their severities and service-context validation.

Sits below selection and design (data -> models -> routes -> states -> rules
-> selection -> design -> views) so both selection and design can use it
without importing upwards.
"""
